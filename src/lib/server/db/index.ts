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

/** The names the app's pools give PostgreSQL (pg_stat_activity.application_name). */
export const APP_POOL_NAME = 'spotface-app';
export const COLLAB_POOL_NAME = 'spotface-collab';
export const ADAPTER_POOL_NAME = 'spotface-adapter';
/** Scripts, tests and benchmarks. */
export const TOOL_POOL_NAME = 'spotface-tool';

/** One pool and one Kysely instance per process; callers pass the URL (no env reads here). */
export function createDb(connectionString: string, max = 10, label = 'app pool', applicationName = TOOL_POOL_NAME): DbHandle {
	const pool = new pg.Pool({ connectionString, max, application_name: applicationName });
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
