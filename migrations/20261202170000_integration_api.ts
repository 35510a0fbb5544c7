import { sql, type Kysely } from 'kysely';

// The integration API: tokens for people and named services (only a SHA-256 of the secret is
// kept), idempotency records for POSTs under /api/v1, webhooks with their deliveries. The queue
// that delivers webhooks and e-mail (pg-boss) creates and migrates its own schema, `pgboss`.
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('api_token')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('person', 'service')`))
		// person: the member the token acts as; service: the service's own account (no password).
		.addColumn('user_id', 'text', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
		.addColumn('name', 'text', (c) => c.notNull().check(sql`char_length(name) between 1 and 100`))
		// service tokens act with this role; person tokens with the member's current role.
		.addColumn('role', 'text', (c) => c.check(sql`role in ('engineer', 'technician', 'viewer')`))
		.addColumn('scope', 'text', (c) => c.notNull().check(sql`scope in ('read', 'read_write')`))
		.addColumn('token_hash', 'text', (c) => c.notNull().unique())
		.addColumn('prefix', 'text', (c) => c.notNull())
		.addColumn('created_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('expires_at', 'timestamptz', (c) => c.notNull())
		.addColumn('revoked_at', 'timestamptz')
		.addColumn('revoked_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('last_used_at', 'timestamptz')
		.addCheckConstraint('api_token_kind_role_check', sql`(kind = 'person' and role is null) or (kind = 'service' and role is not null)`)
		.execute();
	await db.schema.createIndex('api_token_org_idx').on('api_token').columns(['organisation_id', 'created_at']).execute();

	await db.schema
		.createTable('idempotency_record')
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('key', 'text', (c) => c.notNull().check(sql`char_length(key) between 1 and 255`))
		.addColumn('method', 'text', (c) => c.notNull())
		.addColumn('path', 'text', (c) => c.notNull())
		.addColumn('request_hash', 'text', (c) => c.notNull())
		.addColumn('status', 'text', (c) => c.notNull().check(sql`status in ('processing', 'done')`))
		.addColumn('response_status', 'integer')
		.addColumn('response_headers', 'jsonb')
		.addColumn('response_body', 'bytea')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('completed_at', 'timestamptz')
		.addPrimaryKeyConstraint('idempotency_record_pkey', ['organisation_id', 'key'])
		.execute();
	await db.schema.createIndex('idempotency_record_created_idx').on('idempotency_record').column('created_at').execute();

	await db.schema
		.createTable('webhook')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('url', 'text', (c) => c.notNull().check(sql`char_length(url) between 8 and 2000`))
		.addColumn('events', sql`text[]`, (c) => c.notNull())
		.addColumn('description', 'text', (c) => c.notNull().defaultTo(''))
		// Needed in clear to sign each delivery; shown to the admin once when created.
		.addColumn('secret', 'text', (c) => c.notNull())
		.addColumn('created_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('disabled_at', 'timestamptz')
		.execute();
	await db.schema.createIndex('webhook_org_idx').on('webhook').column('organisation_id').execute();

	await db.schema
		.createTable('webhook_delivery')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('webhook_id', 'uuid', (c) => c.notNull().references('webhook.id').onDelete('cascade'))
		.addColumn('event', 'text', (c) => c.notNull())
		.addColumn('event_id', 'uuid', (c) => c.notNull())
		// The exact body sent (and signed) on every attempt.
		.addColumn('body', 'text', (c) => c.notNull())
		.addColumn('status', 'text', (c) =>
			c
				.notNull()
				.defaultTo('queued')
				.check(sql`status in ('queued', 'retrying', 'delivered', 'failed')`)
		)
		.addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
		.addColumn('last_status_code', 'integer')
		.addColumn('last_error', 'text')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('last_attempt_at', 'timestamptz')
		.addColumn('delivered_at', 'timestamptz')
		.execute();
	await db.schema.createIndex('webhook_delivery_org_idx').on('webhook_delivery').columns(['organisation_id', 'created_at']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('webhook_delivery').ifExists().execute();
	await db.schema.dropTable('webhook').ifExists().execute();
	await db.schema.dropTable('idempotency_record').ifExists().execute();
	await db.schema.dropTable('api_token').ifExists().execute();
}
