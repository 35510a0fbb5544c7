import { sql, type Kysely } from 'kysely';

// Mail outbox: who may read a message in the app, a delivery queue; sign-up confirmations;
// counters for sign-in throttling and request limits (rate-limiter-flexible's PostgreSQL store).
export async function up(db: Kysely<any>): Promise<void> {
	// `audience`: 'recipient' = only the mailbox owner may see it (password resets, sign-up
	// confirmations: anything with a sign-in or reset link); 'organisation' = the sending
	// organisation's admins may read it in the in-app outbox (invitations it issued).
	// `organisation_id` is the organisation whose action sent the message (null for personal mail).
	await db.schema
		.alterTable('mail_outbox')
		.addColumn('audience', 'text', (c) =>
			c
				.notNull()
				.defaultTo('recipient')
				.check(sql`audience in ('recipient', 'organisation')`)
		)
		.addColumn('purpose', 'text', (c) => c.notNull().defaultTo('other'))
		.addColumn('next_attempt_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('claimed_at', 'timestamptz')
		.execute();
	// Before this migration only invitations carried an organisation; everything else was a reset.
	await sql`update mail_outbox set audience = 'organisation', purpose = 'invitation' where organisation_id is not null`.execute(db);
	await sql`update mail_outbox set purpose = 'password-reset' where organisation_id is null`.execute(db);
	await sql`alter table mail_outbox drop constraint if exists mail_outbox_status_check`.execute(db);
	await sql`alter table mail_outbox add constraint mail_outbox_status_check check (status in ('queued', 'sending', 'sent', 'failed'))`.execute(
		db
	);
	await sql`alter table mail_outbox add constraint mail_outbox_org_audience_check check (audience = 'recipient' or organisation_id is not null)`.execute(
		db
	);
	await db.schema.createIndex('mail_outbox_queue_idx').on('mail_outbox').columns(['status', 'next_attempt_at']).execute();
	await db.schema.createIndex('mail_outbox_org_idx').on('mail_outbox').columns(['organisation_id', 'created_at']).execute();

	// A sign-up waits here until the owner of the address opens the link mailed to it.
	await db.schema
		.createTable('sign_up_request')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('email', 'text', (c) => c.notNull())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('organisation_name', 'text', (c) => c.notNull())
		.addColumn('password_hash', 'text', (c) => c.notNull())
		.addColumn('token_hash', 'text', (c) => c.notNull().unique())
		.addColumn('expires_at', 'timestamptz', (c) => c.notNull())
		.addColumn('used_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.execute();

	// The table layout rate-limiter-flexible's RateLimiterPostgres expects (it is told
	// `tableCreated: true` and never creates tables itself). `expire` is milliseconds since 1970.
	await db.schema
		.createTable('rate_limit')
		.addColumn('key', 'varchar(255)', (c) => c.primaryKey())
		.addColumn('points', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('expire', 'bigint')
		.execute();
	await db.schema.createIndex('rate_limit_expire_idx').on('rate_limit').column('expire').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('rate_limit').ifExists().execute();
	await db.schema.dropTable('sign_up_request').ifExists().execute();
	await db.schema.dropIndex('mail_outbox_org_idx').ifExists().execute();
	await db.schema.dropIndex('mail_outbox_queue_idx').ifExists().execute();
	await sql`alter table mail_outbox drop constraint if exists mail_outbox_org_audience_check`.execute(db);
	await sql`alter table mail_outbox drop constraint if exists mail_outbox_status_check`.execute(db);
	await sql`update mail_outbox set status = 'queued' where status = 'sending'`.execute(db);
	await sql`alter table mail_outbox add constraint mail_outbox_status_check check (status in ('queued', 'sent', 'failed'))`.execute(db);
	await db.schema
		.alterTable('mail_outbox')
		.dropColumn('claimed_at')
		.dropColumn('next_attempt_at')
		.dropColumn('purpose')
		.dropColumn('audience')
		.execute();
}
