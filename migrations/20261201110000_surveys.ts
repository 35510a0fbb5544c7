import { sql, type Kysely } from 'kysely';

// Surveys (a planned site walk), the machines to walk and the people assigned, and the live
// boards: one board per machine photo or drawing, whose Yjs document is stored as a compacted
// snapshot plus an append-only log of the updates accepted since.
// Rows that refer to other rows of the organisation use composite foreign keys with
// organisation_id, as the register does, so nothing can hang under another organisation.
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('survey')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('site_id', 'uuid', (c) => c.notNull())
		.addColumn('title', 'text', (c) => c.notNull())
		.addColumn('status', 'text', (c) =>
			c
				.notNull()
				.defaultTo('planned')
				.check(sql`status in ('planned', 'walking', 'in_review', 'approved')`)
		)
		.addColumn('planned_date', 'date')
		.addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('created_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('approved_at', 'timestamptz')
		.addColumn('approved_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('archived_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('survey_org_id_key', ['organisation_id', 'id'])
		.addForeignKeyConstraint('survey_site_fk', ['organisation_id', 'site_id'], 'site', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('survey_org_idx').on('survey').columns(['organisation_id', 'archived_at', 'status']).execute();
	await db.schema.createIndex('survey_site_idx').on('survey').columns(['organisation_id', 'site_id']).execute();

	await db.schema
		.createTable('survey_machine')
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('survey_id', 'uuid', (c) => c.notNull())
		.addColumn('machine_id', 'uuid', (c) => c.notNull())
		.addColumn('position', 'integer', (c) => c.notNull().defaultTo(0))
		.addPrimaryKeyConstraint('survey_machine_pkey', ['survey_id', 'machine_id'])
		.addForeignKeyConstraint('survey_machine_survey_fk', ['organisation_id', 'survey_id'], 'survey', ['organisation_id', 'id'], (fk) =>
			fk.onDelete('cascade')
		)
		.addForeignKeyConstraint('survey_machine_machine_fk', ['organisation_id', 'machine_id'], 'machine', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('survey_machine_machine_idx').on('survey_machine').columns(['organisation_id', 'machine_id']).execute();

	await db.schema
		.createTable('survey_assignee')
		.addColumn('survey_id', 'uuid', (c) => c.notNull().references('survey.id').onDelete('cascade'))
		.addColumn('user_id', 'text', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
		.addColumn('role', 'text', (c) => c.notNull().check(sql`role in ('engineer', 'technician')`))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addPrimaryKeyConstraint('survey_assignee_pkey', ['survey_id', 'user_id'])
		.execute();
	await db.schema.createIndex('survey_assignee_user_idx').on('survey_assignee').column('user_id').execute();

	await db.schema
		.createTable('board')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('survey_id', 'uuid', (c) => c.notNull())
		.addColumn('machine_id', 'uuid', (c) => c.notNull())
		.addColumn('media_id', 'uuid')
		.addColumn('title', 'text', (c) => c.notNull())
		// Set when the layout is approved: the live board becomes read-only.
		.addColumn('frozen_at', 'timestamptz')
		// Y.mergeUpdates of every update folded in so far; the log holds what came after.
		.addColumn('snapshot', 'bytea')
		// The highest board_update.seq folded into the snapshot (informational: loading reads the
		// snapshot plus every row still in the log, whatever its seq).
		.addColumn('snapshot_seq', 'bigint', (c) => c.notNull().defaultTo(0))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('board_org_id_key', ['organisation_id', 'id'])
		.addForeignKeyConstraint('board_survey_fk', ['organisation_id', 'survey_id'], 'survey', ['organisation_id', 'id'], (fk) =>
			fk.onDelete('cascade')
		)
		.addForeignKeyConstraint('board_machine_fk', ['organisation_id', 'machine_id'], 'machine', ['organisation_id', 'id'])
		.addForeignKeyConstraint('board_media_fk', ['organisation_id', 'media_id'], 'media', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('board_survey_idx').on('board').columns(['organisation_id', 'survey_id']).execute();
	await db.schema.createIndex('board_machine_idx').on('board').columns(['organisation_id', 'machine_id']).execute();

	await db.schema
		.createTable('board_update')
		.addColumn('seq', 'bigserial', (c) => c.primaryKey())
		.addColumn('board_id', 'uuid', (c) => c.notNull().references('board.id').onDelete('cascade'))
		.addColumn('update', 'bytea', (c) => c.notNull())
		.addColumn('user_id', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.execute();
	await db.schema.createIndex('board_update_board_idx').on('board_update').columns(['board_id', 'seq']).execute();

	// Payloads of the socket.io PostgreSQL adapter that do not fit a NOTIFY (over 8000 bytes or
	// binary). Shape as the adapter expects; it deletes rows older than its cleanup interval.
	await db.schema
		.createTable('socket_io_attachments')
		.addColumn('id', 'bigserial', (c) => c.unique())
		.addColumn('created_at', 'timestamptz', (c) => c.defaultTo(sql`now()`))
		.addColumn('payload', 'bytea')
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['socket_io_attachments', 'board_update', 'board', 'survey_assignee', 'survey_machine', 'survey']) {
		await db.schema.dropTable(t).ifExists().execute();
	}
}
