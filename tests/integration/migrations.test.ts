import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import { readdirSync } from 'node:fs';
import { createEmptyDatabase, type TestDatabase } from '../helpers/db';
import { migrateToEmpty, migrateToLatest } from '../../src/lib/server/db/migrate';

async function userTables(t: TestDatabase) {
	const r = await sql<{ tablename: string }>`
		select tablename from pg_tables where schemaname = 'public' and tablename not like 'kysely_%' order by 1`.execute(t.db);
	return r.rows.map((x) => x.tablename);
}

describe('migrations', () => {
	let t: TestDatabase;
	beforeAll(async () => {
		t = await createEmptyDatabase();
	});
	afterAll(async () => t.drop());

	it('go up from empty, down to empty, and up again', async () => {
		const files = readdirSync('migrations').filter((f) => f.endsWith('.ts'));
		const up1 = await migrateToLatest(t.db);
		expect(up1.results?.filter((r) => r.status === 'Success')).toHaveLength(files.length);
		const tables = await userTables(t);
		expect(tables).toEqual(expect.arrayContaining(['organisation', 'app_user', 'member', 'user_session', 'invitation']));

		await migrateToEmpty(t.db);
		expect(await userTables(t)).toEqual([]);

		await migrateToLatest(t.db);
		expect(await userTables(t)).toEqual(tables);
	});
});
