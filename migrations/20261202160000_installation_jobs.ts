import { sql, type Kysely } from 'kysely';

// Installation jobs issued from an approved revision. A job groups revision points (by default
// one machine's); each job_point refers to its revision point by (revision_board_id, point_id)
// and carries the as-installed record the technician writes on site. The plan itself is read
// from the revision rows, which never change, so the job cannot drift from what was approved.
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('installation_job')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('survey_id', 'uuid', (c) => c.notNull())
		.addColumn('revision_id', 'uuid', (c) => c.notNull().references('survey_revision.id').onDelete('cascade'))
		.addColumn('number', 'integer', (c) => c.notNull().check(sql`number > 0`))
		.addColumn('title', 'text', (c) => c.notNull().check(sql`char_length(title) between 1 and 200`))
		.addColumn('status', 'text', (c) =>
			c
				.notNull()
				.defaultTo('issued')
				.check(sql`status in ('issued', 'closed')`)
		)
		.addColumn('assignee_user_id', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('outage_start', 'timestamptz')
		.addColumn('outage_end', 'timestamptz')
		.addColumn('due_date', 'date')
		.addColumn('lockout_required', 'boolean', (c) => c.notNull())
		.addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('issued_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('issued_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('closed_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('closed_at', 'timestamptz')
		.addColumn('close_note', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('installation_job_org_id_key', ['organisation_id', 'id'])
		.addUniqueConstraint('installation_job_number_key', ['organisation_id', 'number'])
		.addForeignKeyConstraint('installation_job_survey_fk', ['organisation_id', 'survey_id'], 'survey', ['organisation_id', 'id'], (fk) =>
			fk.onDelete('cascade')
		)
		.addCheckConstraint('installation_job_outage_check', sql`outage_end is null or outage_start is null or outage_end > outage_start`)
		.addCheckConstraint('installation_job_closed_check', sql`(status = 'closed') = (closed_at is not null)`)
		.execute();
	await db.schema.createIndex('installation_job_survey_idx').on('installation_job').columns(['organisation_id', 'survey_id']).execute();
	await db.schema
		.createIndex('installation_job_assignee_idx')
		.on('installation_job')
		.columns(['organisation_id', 'assignee_user_id', 'status'])
		.execute();

	await db.schema
		.createTable('job_point')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('job_id', 'uuid', (c) => c.notNull())
		.addColumn('revision_board_id', 'uuid', (c) => c.notNull().references('revision_board.id').onDelete('cascade'))
		.addColumn('point_id', 'text', (c) => c.notNull())
		.addColumn('number', 'integer', (c) => c.notNull().check(sql`number > 0`))
		// The as-installed record; null until recorded.
		.addColumn('mounting_used', 'text', (c) => c.check(sql`mounting_used in ('stud', 'bonded_pad', 'magnet')`))
		.addColumn('torque_nm', 'double precision')
		.addColumn('supply_v', 'double precision')
		.addColumn('polarity_ok', 'boolean')
		.addColumn('photo_media_id', 'uuid')
		.addColumn('ready_at', 'timestamptz')
		.addColumn('baseline_start_at', 'timestamptz')
		.addColumn('deviation', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('deviation_reason', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('findings', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
		.addColumn('worst', 'text')
		.addColumn('recorded_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('recorded_at', 'timestamptz')
		.addColumn('record_key', 'text')
		.addUniqueConstraint('job_point_point_key', ['revision_board_id', 'point_id'])
		.addUniqueConstraint('job_point_number_key', ['job_id', 'number'])
		.addForeignKeyConstraint('job_point_job_fk', ['organisation_id', 'job_id'], 'installation_job', ['organisation_id', 'id'], (fk) =>
			fk.onDelete('cascade')
		)
		.addForeignKeyConstraint('job_point_photo_fk', ['organisation_id', 'photo_media_id'], 'media', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('job_point_job_idx').on('job_point').columns(['organisation_id', 'job_id']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('job_point').ifExists().execute();
	await db.schema.dropTable('installation_job').ifExists().execute();
}
