// Machine register at plant scale: 2,000 machines (plus another organisation's 2,000 in the same
// tables), timed through the API as the machines table page uses it: first page, search, filters,
// sorts, a deep page, and the CSV export. Prints figures; no pass/fail.
//   npx tsx bench/register.ts [--machines 2000] [--repeat 20]
import { parseArgs } from 'node:util';
import { sql } from 'kysely';
import { cpus, loadavg } from 'node:os';
import { openBenchDatabase } from './private-db';
import { createDb } from '../src/lib/server/db/index';
import { hashPassword } from '../src/lib/server/auth/password';
import { startApp } from '../tests/helpers/app';
import { Client } from '../tests/helpers/http';

const { values: args } = parseArgs({
	options: { machines: { type: 'string', default: '2000' }, repeat: { type: 'string', default: '20' } }
});
const N = Number(args.machines);
const REPEAT = Number(args.repeat);
const KINDS = ['motor', 'pump', 'fan', 'compressor', 'gearbox', 'blower', 'other'] as const;

function percentile(sorted: number[], p: number) {
	return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
}

async function seedOrg(db: ReturnType<typeof createDb>['db'], name: string, email: string, hash: string) {
	const org = await db.insertInto('organisation').values({ name }).returning('id').executeTakeFirstOrThrow();
	const userId = `bench-${email}`;
	await db.insertInto('app_user').values({ id: userId, email, name: 'Bench Planner', password_hash: hash }).execute();
	await db.insertInto('member').values({ organisation_id: org.id, user_id: userId, role: 'engineer' }).execute();
	const sites = [];
	for (let s = 0; s < 4; s++) {
		const site = await db
			.insertInto('site')
			.values({ organisation_id: org.id, name: `${name} site ${s + 1}` })
			.returning('id')
			.executeTakeFirstOrThrow();
		const areas = [];
		for (let a = 0; a < 5; a++) {
			areas.push(
				await db
					.insertInto('area')
					.values({ organisation_id: org.id, site_id: site.id, name: `Area ${s + 1}.${a + 1}` })
					.returning('id')
					.executeTakeFirstOrThrow()
			);
		}
		sites.push({ id: site.id, areas });
	}
	const rows = Array.from({ length: N }, (_, i) => {
		const site = sites[i % sites.length];
		const kind = KINDS[i % KINDS.length];
		return {
			organisation_id: org.id,
			site_id: site.id,
			area_id: site.areas[i % site.areas.length].id,
			name: `${kind[0].toUpperCase()}${kind.slice(1)} ${String(i + 1).padStart(4, '0')}`,
			tag: `${kind.slice(0, 2).toUpperCase()}-${String(i + 1).padStart(4, '0')}`,
			kind,
			speed_rpm: [740, 985, 1480, 2960][i % 4],
			power_kw: [7.5, 15, 30, 55, 90, 160][i % 6],
			hazardous_area: i % 17 === 0,
			hazardous_zone_note: i % 17 === 0 ? 'Zone 2' : '',
			notes: i % 10 === 0 ? 'Bearing housing repainted; check seat' : ''
		};
	});
	for (let i = 0; i < rows.length; i += 500)
		await db
			.insertInto('machine')
			.values(rows.slice(i, i + 500))
			.execute();
	return { orgId: org.id, siteId: sites[0].id };
}

async function main() {
	console.log(
		`machine load average at the start: ${loadavg()
			.map((x) => x.toFixed(2))
			.join(' ')} (${cpus().length} CPUs)`
	);
	const bench = await openBenchDatabase({ dir: '.data/pg-bench', defaultPort: 54349, name: 'spotface_bench_register' });
	const { url, handle: h } = bench;
	const hash = await hashPassword('bench planner 1');
	const seeded = Date.now();
	const mine = await seedOrg(h.db, 'Bench Utility', 'planner@bench.test', hash);
	await seedOrg(h.db, 'Other Utility', 'other@bench.test', hash);
	await sql`analyze`.execute(h.db);
	console.log(`seeded 2 organisations × ${N} machines in ${((Date.now() - seeded) / 1000).toFixed(1)} s`);

	const app = await startApp({ databaseUrl: url });
	const c = new Client(app.url);
	await c.signIn('planner@bench.test', 'bench planner 1');
	const cases: Array<[string, string]> = [
		['first page (50, by name)', '/api/v1/machines'],
		['search "pump 1"', '/api/v1/machines?q=pump%201'],
		['search by tag "FA-01"', '/api/v1/machines?q=FA-01'],
		['filter kind=fan, one site', `/api/v1/machines?kind=fan&siteId=${mine.siteId}`],
		['hazardous only', '/api/v1/machines?hazardous=yes'],
		['sort by power, descending', '/api/v1/machines?sort=power&dir=desc'],
		['sort by area', '/api/v1/machines?sort=area'],
		['deep page (page 40 of 50 per page)', '/api/v1/machines?page=40'],
		['200 per page', '/api/v1/machines?perPage=200'],
		['machines table page (HTML)', '/register/machines?sort=updated&dir=desc'],
		['CSV export of all', '/api/v1/machines/export']
	];
	console.log(`\n${'query'.padEnd(40)} ${'rows'.padStart(6)} ${'p50 ms'.padStart(8)} ${'p95 ms'.padStart(8)} ${'max ms'.padStart(8)}`);
	for (const [label, path] of cases) {
		const times: number[] = [];
		let rows = '';
		for (let i = 0; i < REPEAT; i++) {
			const t0 = performance.now();
			const res = await c.get(path, { accept: path.startsWith('/api/') ? 'application/json' : 'text/html' });
			const body = await res.text();
			times.push(performance.now() - t0);
			if (res.status !== 200) throw new Error(`${path}: HTTP ${res.status} ${body.slice(0, 200)}`);
			if (i === 0) {
				if (path.endsWith('/export')) rows = String(body.trim().split('\n').length - 1);
				else if (path.startsWith('/api/')) {
					const j = JSON.parse(body);
					rows = `${j.items?.length ?? '?'}/${j.total ?? '?'}`;
				} else rows = '-';
			}
		}
		times.sort((a, b) => a - b);
		console.log(
			`${label.padEnd(40)} ${rows.padStart(6)} ${percentile(times, 50).toFixed(1).padStart(8)} ${percentile(times, 95).toFixed(1).padStart(8)} ${times[times.length - 1].toFixed(1).padStart(8)}`
		);
	}
	await app.stop();
	await h.close();
	bench.cluster.psql('drop database if exists spotface_bench_register with (force)');
	bench.cluster.stop();
}

main().catch((e) => {
	console.error(e);
	process.exit(1);
});
