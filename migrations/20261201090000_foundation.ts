import { sql, type Kysely } from 'kysely';

// Organisations, people, sessions, invitations, password resets, audit trail and mail outbox.
export async function up(db: Kysely<any>): Promise<void> {
	await sql`create extension if not exists pgcrypto`.execute(db);

	await db.schema
		.createTable('organisation')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('settings', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.execute();

	await db.schema
		.createTable('app_user')
		.addColumn('id', 'text', (c) => c.primaryKey())
		.addColumn('email', 'text', (c) => c.notNull())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('password_hash', 'text', (c) => c.notNull())
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.execute();
	await sql`create unique index app_user_email_key on app_user (lower(email))`.execute(db);

	await db.schema
		.createTable('member')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('user_id', 'text', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
		.addColumn('role', 'text', (c) => c.notNull().check(sql`role in ('admin', 'engineer', 'technician', 'viewer')`))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('member_org_user_key', ['organisation_id', 'user_id'])
		.execute();

	await db.schema
		.createTable('user_session')
		.addColumn('id', 'text', (c) => c.primaryKey())
		.addColumn('user_id', 'text', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
		.addColumn('expires_at', 'timestamptz', (c) => c.notNull())
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.execute();
	await db.schema.createIndex('user_session_user_idx').on('user_session').column('user_id').execute();

	await db.schema
		.createTable('invitation')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('email', 'text', (c) => c.notNull())
		.addColumn('role', 'text', (c) => c.notNull().check(sql`role in ('admin', 'engineer', 'technician', 'viewer')`))
		.addColumn('token_hash', 'text', (c) => c.notNull().unique())
		.addColumn('invited_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('expires_at', 'timestamptz', (c) => c.notNull())
		.addColumn('accepted_at', 'timestamptz')
		.addColumn('revoked_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.execute();
	await db.schema.createIndex('invitation_org_idx').on('invitation').column('organisation_id').execute();

	await db.schema
		.createTable('password_reset')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('user_id', 'text', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
		.addColumn('token_hash', 'text', (c) => c.notNull().unique())
		.addColumn('expires_at', 'timestamptz', (c) => c.notNull())
		.addColumn('used_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.execute();

	await db.schema
		.createTable('audit_event')
		.addColumn('id', 'bigserial', (c) => c.primaryKey())
		.addColumn('organisation_id', 'uuid', (c) => c.references('organisation.id').onDelete('cascade'))
		.addColumn('actor_user_id', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('action', 'text', (c) => c.notNull())
		.addColumn('subject_type', 'text')
		.addColumn('subject_id', 'text')
		.addColumn('data', 'jsonb', (c) => c.notNull().defaultTo(sql`'{}'::jsonb`))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.execute();
	await db.schema.createIndex('audit_event_org_idx').on('audit_event').columns(['organisation_id', 'created_at']).execute();

	await db.schema
		.createTable('mail_outbox')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.references('organisation.id').onDelete('cascade'))
		.addColumn('to_address', 'text', (c) => c.notNull())
		.addColumn('subject', 'text', (c) => c.notNull())
		.addColumn('body_text', 'text', (c) => c.notNull())
		.addColumn('status', 'text', (c) =>
			c
				.notNull()
				.defaultTo('queued')
				.check(sql`status in ('queued', 'sent', 'failed')`)
		)
		.addColumn('error', 'text')
		.addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('sent_at', 'timestamptz')
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['mail_outbox', 'audit_event', 'password_reset', 'invitation', 'user_session', 'member', 'app_user', 'organisation']) {
		await db.schema.dropTable(t).ifExists().execute();
	}
}
