import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import type { Database } from './types';

export type DB = Kysely<Database>;

export interface DbHandle {
	db: DB;
	pool: pg.Pool;
	close(): Promise<void>;
}

/** One pool and one Kysely instance per process; callers pass the URL (no env reads here). */
export function createDb(connectionString: string, max = 10): DbHandle {
	const pool = new pg.Pool({ connectionString, max });
	// An idle client that loses its connection must not crash the process.
	pool.on('error', (err) => console.error('[db] idle client error:', err.message));
	const db = new Kysely<Database>({ dialect: new PostgresDialect({ pool }) });
	return {
		db,
		pool,
		async close() {
			await db.destroy();
		}
	};
}
