import { Kysely, PostgresDialect } from 'kysely';
import pg from 'pg';
import type { Database } from './types';
import { guardPool } from '../db-health';

export type DB = Kysely<Database>;

export interface DbHandle {
	db: DB;
	pool: pg.Pool;
	close(): Promise<void>;
}

/** One pool and one Kysely instance per process; callers pass the URL (no env reads here). */
export function createDb(connectionString: string, max = 10, label = 'app pool'): DbHandle {
	const pool = new pg.Pool({ connectionString, max });
	// A client that loses its connection, idle or checked out (Kysely holds one through a
	// transaction), must not crash the process.
	guardPool(pool, label);
	const db = new Kysely<Database>({ dialect: new PostgresDialect({ pool }) });
	return {
		db,
		pool,
		async close() {
			await db.destroy();
		}
	};
}
