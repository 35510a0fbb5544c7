import { sql, type Kysely } from 'kysely';

// Approved revisions stored as rows: approving a survey writes the next revision with every
// board's points, routes, zones and scale as they were, the findings at that moment, and a hash
// of each board's Yjs state vector. Revisions are never changed afterwards.
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('survey_revision')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('survey_id', 'uuid', (c) => c.notNull())
		.addColumn('number', 'integer', (c) => c.notNull().check(sql`number > 0`))
		.addColumn('approved_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('approved_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('confirmed_exceptions', 'jsonb')
		.addUniqueConstraint('survey_revision_number_key', ['survey_id', 'number'])
		.addForeignKeyConstraint('survey_revision_survey_fk', ['organisation_id', 'survey_id'], 'survey', ['organisation_id', 'id'], (fk) =>
			fk.onDelete('cascade')
		)
		.execute();

	await db.schema
		.createTable('revision_board')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('revision_id', 'uuid', (c) => c.notNull().references('survey_revision.id').onDelete('cascade'))
		.addColumn('board_id', 'uuid', (c) => c.notNull().references('board.id').onDelete('cascade'))
		.addColumn('machine_id', 'uuid', (c) => c.notNull())
		.addColumn('media_id', 'uuid')
		.addColumn('title', 'text', (c) => c.notNull())
		.addColumn('state_vector_sha256', 'text', (c) => c.notNull().check(sql`state_vector_sha256 ~ '^[0-9a-f]{64}$'`))
		.addColumn('scale_ax', 'double precision')
		.addColumn('scale_ay', 'double precision')
		.addColumn('scale_bx', 'double precision')
		.addColumn('scale_by', 'double precision')
		.addColumn('scale_length_mm', 'double precision')
		.addUniqueConstraint('revision_board_key', ['revision_id', 'board_id'])
		.execute();

	await db.schema
		.createTable('revision_point')
		.addColumn('revision_board_id', 'uuid', (c) => c.notNull().references('revision_board.id').onDelete('cascade'))
		.addColumn('revision_id', 'uuid', (c) => c.notNull().references('survey_revision.id').onDelete('cascade'))
		.addColumn('point_id', 'text', (c) => c.notNull())
		.addColumn('label', 'text', (c) => c.notNull())
		.addColumn('component', 'text', (c) => c.notNull())
		.addColumn('x', 'double precision', (c) => c.notNull())
		.addColumn('y', 'double precision', (c) => c.notNull())
		.addColumn('status', 'text', (c) => c.notNull())
		.addColumn('decision', 'text')
		.addColumn('decision_reason', 'text')
		.addColumn('direction', 'text')
		.addColumn('surface', 'text')
		.addColumn('mounting', 'text')
		.addColumn('material', 'text')
		.addColumn('flat_diameter_mm', 'double precision')
		.addColumn('wall_thickness_mm', 'double precision')
		.addColumn('distance_to_bearing_mm', 'double precision')
		.addColumn('distance_used_mm', 'double precision')
		.addColumn('distance_source', 'text')
		.addColumn('surface_temp_c', 'double precision')
		.addColumn('notes', 'text', (c) => c.notNull())
		.addColumn('created_by', 'text', (c) => c.notNull())
		.addColumn('fields', 'jsonb', (c) => c.notNull())
		.addColumn('findings', 'jsonb', (c) => c.notNull())
		.addColumn('worst', 'text', (c) => c.notNull())
		.addPrimaryKeyConstraint('revision_point_pkey', ['revision_board_id', 'point_id'])
		.execute();
	await db.schema.createIndex('revision_point_revision_idx').on('revision_point').column('revision_id').execute();

	await db.schema
		.createTable('revision_route')
		.addColumn('revision_board_id', 'uuid', (c) => c.notNull().references('revision_board.id').onDelete('cascade'))
		.addColumn('revision_id', 'uuid', (c) => c.notNull().references('survey_revision.id').onDelete('cascade'))
		.addColumn('route_id', 'text', (c) => c.notNull())
		.addColumn('point_id', 'text', (c) => c.notNull())
		.addColumn('supply_point_id', 'text')
		.addColumn('exit_label', 'text', (c) => c.notNull())
		.addColumn('vertices', 'jsonb', (c) => c.notNull())
		.addColumn('length_m', 'double precision')
		.addColumn('length_source', 'text')
		.addColumn('photo_length_m', 'double precision')
		.addColumn('cross_section_mm2', 'double precision')
		.addColumn('fixings', 'text')
		.addColumn('supply_v', 'double precision')
		.addColumn('notes', 'text', (c) => c.notNull())
		.addColumn('fields', 'jsonb', (c) => c.notNull())
		.addColumn('findings', 'jsonb', (c) => c.notNull())
		.addColumn('worst', 'text', (c) => c.notNull())
		.addPrimaryKeyConstraint('revision_route_pkey', ['revision_board_id', 'route_id'])
		.execute();
	await db.schema.createIndex('revision_route_revision_idx').on('revision_route').column('revision_id').execute();

	await db.schema
		.createTable('revision_zone')
		.addColumn('revision_board_id', 'uuid', (c) => c.notNull().references('revision_board.id').onDelete('cascade'))
		.addColumn('revision_id', 'uuid', (c) => c.notNull().references('survey_revision.id').onDelete('cascade'))
		.addColumn('zone_id', 'text', (c) => c.notNull())
		.addColumn('label', 'text', (c) => c.notNull())
		.addColumn('kind', 'text', (c) => c.notNull())
		.addColumn('polygon', 'jsonb', (c) => c.notNull())
		.addColumn('fields', 'jsonb', (c) => c.notNull())
		.addPrimaryKeyConstraint('revision_zone_pkey', ['revision_board_id', 'zone_id'])
		.execute();
	await db.schema.createIndex('revision_zone_revision_idx').on('revision_zone').column('revision_id').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['revision_zone', 'revision_route', 'revision_point', 'revision_board', 'survey_revision']) {
		await db.schema.dropTable(t).ifExists().execute();
	}
}
