import { sql, type Kysely } from 'kysely';

// Each person reads and types measurements in metric or US customary units. Stored values stay
// SI everywhere; this is only how a person's pages show and read them.
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.alterTable('app_user')
		.addColumn('unit_system', 'text', (c) =>
			c
				.notNull()
				.defaultTo('metric')
				.check(sql`unit_system in ('metric', 'us')`)
		)
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.alterTable('app_user').dropColumn('unit_system').execute();
}
