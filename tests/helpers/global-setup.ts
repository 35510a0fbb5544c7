// Runs once before integration and browser tests: makes sure the test cluster runs, migrates a
// template database that each test file clones, and makes sure the app is built.
import { existsSync, readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import pg from 'pg';
import { createDb } from '../../src/lib/server/db/index';
import { migrateToLatest } from '../../src/lib/server/db/migrate';
import { startCluster } from '../../server/setup/pg.mjs';

export const TEMPLATE_DB = 'spotface_template';

export default async function setup() {
	if (!process.env.SPOTFACE_TEST_PG_URL) {
		const c = startCluster({
			dir: '.data/pg-test',
			port: Number(process.env.SPOTFACE_TEST_PG_PORT ?? 54339),
			dbName: 'spotface_test',
			log: () => {}
		});
		process.env.SPOTFACE_TEST_PG_URL = c.url;
	}
	const adminUrl = withDb(process.env.SPOTFACE_TEST_PG_URL!, 'postgres');
	const client = new pg.Client({ connectionString: adminUrl });
	await client.connect();
	// Several projects run this setup; one at a time, and the template is rebuilt only when the
	// migrations on disk differ from those applied to it.
	await client.query('select pg_advisory_lock(727001)');
	try {
		const wanted = readdirSync('migrations')
			.filter((f) => /\.(ts|js)$/.test(f))
			.map((f) => f.replace(/\.(ts|js)$/, ''))
			.sort()
			.join(',');
		let applied = '';
		const exists = await client.query('select 1 from pg_database where datname = $1', [TEMPLATE_DB]);
		if (exists.rowCount) {
			const t = new pg.Client({ connectionString: withDb(adminUrl, TEMPLATE_DB) });
			await t.connect();
			try {
				const r = await t.query('select name from kysely_migration order by name');
				applied = r.rows.map((x) => x.name).join(',');
			} catch {
				applied = '';
			} finally {
				await t.end();
			}
		}
		if (applied !== wanted) {
			await client.query(`drop database if exists ${TEMPLATE_DB} with (force)`);
			await client.query(`create database ${TEMPLATE_DB}`);
			const h = createDb(withDb(adminUrl, TEMPLATE_DB), 1);
			await migrateToLatest(h.db);
			await h.close();
		}
		if (!existsSync('build/handler.js') || process.env.SPOTFACE_TEST_BUILD === '1') {
			const r = spawnSync('npx', ['vite', 'build', '--logLevel', 'error'], { stdio: 'inherit' });
			if (r.status !== 0) throw new Error('vite build failed');
		}
	} finally {
		await client.query('select pg_advisory_unlock(727001)');
		await client.end();
	}
}

export function withDb(url: string, db: string) {
	const u = new URL(url);
	u.pathname = `/${db}`;
	return u.toString();
}
