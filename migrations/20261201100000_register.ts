import { sql, type Kysely } from 'kysely';

// The machine register: sites, areas, 24 V DC supply points, machines, bearings and media
// (photos and drawings). Nothing a survey refers to is ever deleted: rows are archived.
// Every table carries organisation_id; child rows reference their parent together with the
// organisation (composite foreign keys), so a row can never hang under another organisation.
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('site')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('code', 'text')
		.addColumn('address', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('archived_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('site_org_id_key', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('site_org_idx').on('site').columns(['organisation_id', 'archived_at']).execute();

	await db.schema
		.createTable('area')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('site_id', 'uuid', (c) => c.notNull())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('archived_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('area_org_id_key', ['organisation_id', 'id'])
		.addForeignKeyConstraint('area_site_fk', ['organisation_id', 'site_id'], 'site', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('area_site_idx').on('area').columns(['organisation_id', 'site_id']).execute();

	await db.schema
		.createTable('supply_point')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('area_id', 'uuid', (c) => c.notNull())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('tag', 'text')
		.addColumn('voltage_v', 'double precision', (c) =>
			c
				.notNull()
				.defaultTo(24)
				.check(sql`voltage_v > 0 and voltage_v <= 60`)
		)
		.addColumn('max_current_a', 'double precision', (c) => c.check(sql`max_current_a is null or max_current_a > 0`))
		.addColumn('location_note', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('archived_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('supply_point_org_id_key', ['organisation_id', 'id'])
		.addForeignKeyConstraint('supply_point_area_fk', ['organisation_id', 'area_id'], 'area', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('supply_point_area_idx').on('supply_point').columns(['organisation_id', 'area_id']).execute();

	await db.schema
		.createTable('machine')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('site_id', 'uuid', (c) => c.notNull())
		.addColumn('area_id', 'uuid')
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('tag', 'text')
		.addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('motor', 'pump', 'fan', 'compressor', 'gearbox', 'blower', 'other')`))
		.addColumn('speed_rpm', 'double precision', (c) => c.check(sql`speed_rpm is null or speed_rpm > 0`))
		.addColumn('speed_mode', 'text', (c) =>
			c
				.notNull()
				.defaultTo('constant')
				.check(sql`speed_mode in ('constant', 'variable')`)
		)
		.addColumn('speed_signal', 'boolean', (c) => c.notNull().defaultTo(false))
		.addColumn('power_kw', 'double precision', (c) => c.check(sql`power_kw is null or power_kw > 0`))
		.addColumn('foundation', 'text', (c) => c.check(sql`foundation is null or foundation in ('rigid', 'flexible')`))
		.addColumn('hazardous_area', 'boolean', (c) => c.notNull().defaultTo(false))
		.addColumn('hazardous_zone_note', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('archived_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('machine_org_id_key', ['organisation_id', 'id'])
		.addForeignKeyConstraint('machine_site_fk', ['organisation_id', 'site_id'], 'site', ['organisation_id', 'id'])
		.addForeignKeyConstraint('machine_area_fk', ['organisation_id', 'area_id'], 'area', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('machine_org_idx').on('machine').columns(['organisation_id', 'archived_at', 'name']).execute();
	await db.schema.createIndex('machine_site_idx').on('machine').columns(['organisation_id', 'site_id']).execute();
	await db.schema.createIndex('machine_area_idx').on('machine').columns(['organisation_id', 'area_id']).execute();
	// A tag names one live machine in an organisation (archived machines free their tag).
	await sql`create unique index machine_tag_key on machine (organisation_id, lower(tag)) where archived_at is null and tag is not null`.execute(
		db
	);

	await db.schema
		.createTable('bearing')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('machine_id', 'uuid', (c) => c.notNull())
		.addColumn('position', 'text', (c) => c.notNull().check(sql`position in ('drive_end', 'non_drive_end')`))
		.addColumn('component', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('designation', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('rolling_elements', 'integer', (c) => c.check(sql`rolling_elements is null or rolling_elements between 3 and 200`))
		.addColumn('rolling_element_d_mm', 'double precision', (c) => c.check(sql`rolling_element_d_mm is null or rolling_element_d_mm > 0`))
		.addColumn('pitch_d_mm', 'double precision', (c) => c.check(sql`pitch_d_mm is null or pitch_d_mm > 0`))
		.addColumn('contact_angle_deg', 'double precision', (c) =>
			c
				.notNull()
				.defaultTo(0)
				.check(sql`contact_angle_deg >= 0 and contact_angle_deg < 90`)
		)
		.addColumn('notes', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('archived_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('bearing_org_id_key', ['organisation_id', 'id'])
		.addForeignKeyConstraint('bearing_machine_fk', ['organisation_id', 'machine_id'], 'machine', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('bearing_machine_idx').on('bearing').columns(['organisation_id', 'machine_id']).execute();

	await db.schema
		.createTable('media')
		.addColumn('id', 'uuid', (c) => c.primaryKey().defaultTo(sql`gen_random_uuid()`))
		.addColumn('organisation_id', 'uuid', (c) => c.notNull().references('organisation.id').onDelete('cascade'))
		.addColumn('machine_id', 'uuid', (c) => c.notNull())
		.addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('photo', 'drawing')`))
		.addColumn('caption', 'text', (c) => c.notNull().defaultTo(''))
		.addColumn('original_filename', 'text', (c) => c.notNull())
		// Type of the uploaded file as read from its bytes (never from the name or the header).
		.addColumn('mime_type', 'text', (c) => c.notNull())
		.addColumn('display_mime_type', 'text', (c) => c.notNull())
		.addColumn('thumb_mime_type', 'text', (c) => c.notNull())
		.addColumn('width', 'integer', (c) => c.notNull())
		.addColumn('height', 'integer', (c) => c.notNull())
		.addColumn('thumb_width', 'integer', (c) => c.notNull())
		.addColumn('thumb_height', 'integer', (c) => c.notNull())
		.addColumn('original_bytes', 'integer', (c) => c.notNull())
		.addColumn('display_bytes', 'integer', (c) => c.notNull())
		.addColumn('thumb_bytes', 'integer', (c) => c.notNull())
		.addColumn('original_key', 'text', (c) => c.notNull())
		.addColumn('display_key', 'text', (c) => c.notNull())
		.addColumn('thumb_key', 'text', (c) => c.notNull())
		// sha256 of the original upload; the display image's hash is the ETag it is served with.
		.addColumn('sha256', 'text', (c) => c.notNull())
		.addColumn('etag', 'text', (c) => c.notNull())
		.addColumn('uploaded_by', 'text', (c) => c.references('app_user.id').onDelete('set null'))
		.addColumn('archived_at', 'timestamptz')
		.addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addUniqueConstraint('media_org_id_key', ['organisation_id', 'id'])
		.addForeignKeyConstraint('media_machine_fk', ['organisation_id', 'machine_id'], 'machine', ['organisation_id', 'id'])
		.execute();
	await db.schema.createIndex('media_machine_idx').on('media').columns(['organisation_id', 'machine_id', 'created_at']).execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['media', 'bearing', 'machine', 'supply_point', 'area', 'site']) {
		await db.schema.dropTable(t).ifExists().execute();
	}
}
