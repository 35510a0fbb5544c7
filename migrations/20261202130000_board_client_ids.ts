import type { Kysely } from 'kysely';
import { sql } from 'kysely';

// Which member writes under which Yjs client id on a board. A client id is claimed by the first
// member whose update introduces it; afterwards only that member may write structs under it, so
// nobody can forge changes in someone else's name (the server checks every update).
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('board_client')
		.addColumn('board_id', 'uuid', (c) => c.notNull().references('board.id').onDelete('cascade'))
		.addColumn('client_id', 'bigint', (c) => c.notNull())
		.addColumn('user_id', 'text', (c) => c.notNull().references('app_user.id').onDelete('cascade'))
		.addColumn('claimed_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
		.addPrimaryKeyConstraint('board_client_pkey', ['board_id', 'client_id'])
		.execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	await db.schema.dropTable('board_client').execute();
}
