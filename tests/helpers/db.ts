// A fresh database per test file, cloned from the migrated template (fast, isolated, parallel).
import pg from 'pg';
import { randomBytes } from 'node:crypto';
import { sql } from 'kysely';
import { createDb, type DbHandle } from '../../src/lib/server/db/index';
import { TEMPLATE_DB, withDb } from './global-setup';

export interface TestDatabase extends DbHandle {
	url: string;
	name: string;
	/** Empty every table except the migration bookkeeping. */
	truncate(): Promise<void>;
	drop(): Promise<void>;
}

function adminUrl() {
	const u = process.env.SPOTFACE_TEST_PG_URL;
	if (!u) throw new Error('SPOTFACE_TEST_PG_URL is not set: run tests through vitest with the global setup');
	return withDb(u, 'postgres');
}

async function admin<T>(fn: (c: pg.Client) => Promise<T>): Promise<T> {
	const c = new pg.Client({ connectionString: adminUrl() });
	await c.connect();
	try {
		return await fn(c);
	} finally {
		await c.end();
	}
}

export async function createTestDatabase(): Promise<TestDatabase> {
	const name = `t_${randomBytes(6).toString('hex')}`;
	for (let attempt = 0; ; attempt++) {
		try {
			await admin((c) => c.query(`create database ${name} template ${TEMPLATE_DB}`));
			break;
		} catch (e) {
			if (attempt > 20 || !/being accessed by other users/.test((e as Error).message)) throw e;
			await new Promise((r) => setTimeout(r, 100 + Math.random() * 200));
		}
	}
	const url = withDb(adminUrl(), name);
	const handle = createDb(url, 5);
	return {
		...handle,
		url,
		name,
		async truncate() {
			const tables = await sql<{ tablename: string }>`
				select tablename from pg_tables where schemaname = 'public' and tablename not like 'kysely_%'`.execute(handle.db);
			if (tables.rows.length) {
				await sql.raw(`truncate ${tables.rows.map((t) => `"${t.tablename}"`).join(', ')} restart identity cascade`).execute(handle.db);
			}
		},
		async drop() {
			await handle.close();
			await admin((c) => c.query(`drop database if exists ${name} with (force)`));
		}
	};
}

/** An empty database with no migrations applied (for the migration round-trip test). */
export async function createEmptyDatabase(): Promise<TestDatabase> {
	const name = `e_${randomBytes(6).toString('hex')}`;
	await admin((c) => c.query(`create database ${name}`));
	const url = withDb(adminUrl(), name);
	const handle = createDb(url, 2);
	return {
		...handle,
		url,
		name,
		async truncate() {},
		async drop() {
			await handle.close();
			await admin((c) => c.query(`drop database if exists ${name} with (force)`));
		}
	};
}
