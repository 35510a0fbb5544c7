// The database goes away under a running app (cluster mode, the default): every one of the
// app's connections is terminated in turn while two people edit a board, then the whole
// PostgreSQL cluster is stopped at once (immediate mode, as in a crash) and started again.
// The process must stay up, /api/health must say what is down and recover, edits made meanwhile
// must be kept by the clients and stored once the database is back, and nothing acknowledged
// may be lost. Runs on a private cluster (its stop and start would hit every other test file on
// the shared one): .data/pg-outage on SPOTFACE_TEST_PG_PORT + 10.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { isDeepStrictEqual } from 'node:util';
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { startCluster } from '../../server/setup/pg.mjs';
import { createDb, type DbHandle } from '../../src/lib/server/db/index';
import { migrateToLatest } from '../../src/lib/server/db/migrate';
import { startApp, type RunningApp } from '../helpers/app';
import { content, createBoardFixture, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, readBoard } from '../../src/lib/board/model';
import type { BoardProvider } from '../../src/lib/board/sync/provider';

const TEST_APP_NAME = 'spotface-outage-test';
const port = Number(process.env.SPOTFACE_TEST_PG_PORT ?? 54339) + 10;

let cluster: ReturnType<typeof startCluster>;
let dbName: string;
let dbUrl: string;
let h: DbHandle;
let app: RunningApp;
let f: BoardFixture;
const providers: BoardProvider[] = [];

function withDb(url: string, db: string, appName?: string) {
	const u = new URL(url);
	u.pathname = `/${db}`;
	if (appName) u.searchParams.set('application_name', appName);
	return u.toString();
}

async function admin<T>(fn: (c: pg.Client) => Promise<T>, db = 'postgres'): Promise<T> {
	const c = new pg.Client({ connectionString: withDb(cluster.url, db, TEST_APP_NAME) });
	await c.connect();
	try {
		return await fn(c);
	} finally {
		await c.end();
	}
}

/** The app's connections to its database (not this test's). */
async function appBackends(): Promise<Array<{ pid: number; query: string }>> {
	return admin(async (c) => {
		const r = await c.query(
			`select pid, left(query, 60) as query from pg_stat_activity
			 where datname = $1 and pid <> pg_backend_pid() and application_name <> $2 order by pid`,
			[dbName, TEST_APP_NAME]
		);
		return r.rows;
	});
}

async function health(): Promise<{ status: number; body: { status: string; down: string[] } }> {
	const res = await fetch(`${app.url}/api/health`);
	return { status: res.status, body: await res.json() };
}

function alive() {
	return app.process.exitCode === null && app.process.signalCode === null;
}

/** Labels of every point a client added, and whether the server acknowledged it. */
const made: string[] = [];
let counter = 0;
function edit(p: BoardProvider) {
	const label = `P${++counter}`;
	addPoint(p.doc, { x: 10 + counter, y: 20 + counter, label });
	made.push(label);
	return label;
}

async function settled(what: string, timeoutMs = 30_000) {
	const [a, b] = providers;
	await waitFor(() => a.unsynced === 0 && b.unsynced === 0, `${what}: every edit acknowledged`, timeoutMs);
	await waitFor(() => isDeepStrictEqual(content(a.doc), content(b.doc)), `${what}: both clients converge`, timeoutMs);
	// Acknowledged means stored: the database holds every point either client has.
	const stored = readBoard(await storedDoc(h.db, f.boardIds[0]))
		.points.map((p) => p.label)
		.sort();
	expect(stored).toEqual(
		readBoard(a.doc)
			.points.map((p) => p.label)
			.sort()
	);
}

beforeAll(async () => {
	cluster = startCluster({ dir: '.data/pg-outage', port, dbName: 'postgres', log: () => {} });
	dbName = `o_${randomBytes(5).toString('hex')}`;
	await admin((c) => c.query(`create database ${dbName}`));
	dbUrl = withDb(cluster.url, dbName);
	h = createDb(withDb(cluster.url, dbName, TEST_APP_NAME), 2, 'outage test');
	await migrateToLatest(h.db);
	f = await createBoardFixture(h.db, { boards: 1 });
	app = await startApp({ databaseUrl: dbUrl, env: { COLLAB_CLUSTER: '1', COLLAB_SESSION_CHECK_MS: '0' } });
	for (const role of ['engineer', 'technician'] as const) {
		const p = openProvider(app.url, f.boardIds[0], await sessionCookie(app.url, f.people[role]));
		providers.push(p);
	}
	await Promise.all(providers.map((p) => p.whenSynced()));
}, 180_000);

afterAll(async () => {
	await Promise.all(providers.map((p) => p.destroy()));
	await app?.stop();
	await h?.close().catch(() => {});
	if (cluster) {
		// Make sure it runs (a failed test may have left it stopped), drop the database, stop it.
		cluster = startCluster({ dir: '.data/pg-outage', port, dbName: 'postgres', log: () => {} });
		await admin((c) => c.query(`drop database if exists ${dbName} with (force)`)).catch(() => {});
		cluster.stop();
	}
});

describe('the database goes away under a running app', () => {
	it('survives every one of its connections being terminated in turn, with edits in between', async () => {
		const [a, b] = providers;
		edit(a);
		edit(b);
		await settled('before');
		expect((await health()).status).toBe(200);

		let terminated = 0;
		for (let round = 0; round < 2; round++) {
			// Wait for the listeners to be back (health ok) before taking them down again.
			await waitFor(async () => (await health()).status === 200, `health ok before round ${round + 1}`, 20_000);
			const backends = await appBackends();
			// The app pool (health, sign-in), the live board's pool, its listener and the adapter's.
			expect(backends.map((b) => b.query)).toEqual(expect.arrayContaining(['LISTEN spotface_board', 'LISTEN "socket.io#/"']));
			expect(backends.length).toBeGreaterThanOrEqual(4);
			for (const { pid } of backends) {
				await admin((c) => c.query('select pg_terminate_backend($1)', [pid]));
				terminated++;
				edit(a);
				edit(b);
				await settled(`after terminating backend ${pid}`);
				expect(alive()).toBe(true);
			}
		}
		expect(terminated).toBeGreaterThanOrEqual(6);
		// The listeners come back: health is ok again.
		await waitFor(async () => (await health()).status === 200, 'health ok after the terminations', 20_000);
		expect(app.output()).not.toMatch(/Unhandled 'error' event|uncaught exception|unhandled rejection/i);
	});

	it('keeps edits made while the cluster is down, reports degraded, and recovers by itself', async () => {
		const [a, b] = providers;
		const viewerCookie = await sessionCookie(app.url, f.people.viewer);
		cluster.stop('immediate');
		// Edits while the database is away: the server cannot store them, the clients keep them.
		const during = [edit(a), edit(b)];
		await waitFor(() => a.delayed !== null && b.delayed !== null, 'both clients told their edits are held back', 20_000);
		expect(a.unsynced).toBeGreaterThan(0);
		expect(b.unsynced).toBeGreaterThan(0);
		expect(a.status).toBe('connected');
		// Each keeps its own edit, unacknowledged. (The other may already show it: peers see an
		// edit once the server has checked it, before it is stored.)
		expect(readBoard(a.doc).points.map((p) => p.label)).toContain(during[0]);
		expect(readBoard(b.doc).points.map((p) => p.label)).toContain(during[1]);
		const down = await waitFor(
			async () => {
				const r = await health();
				return r.status === 503 && r.body.down.includes('database') && r.body.down.includes('board-state listener') ? r : null;
			},
			'health degraded with the parts that are down',
			20_000
		);
		expect(down!.body.status).toBe('degraded');
		// More edits while down, held back with the first. While the board's earlier updates
		// wait for the database, it takes nothing new: these reach nobody until stored.
		during.push(edit(a), edit(b));
		await new Promise((r) => setTimeout(r, 3000));
		expect(readBoard(b.doc).points.map((p) => p.label)).not.toContain(during[2]);
		expect(readBoard(a.doc).points.map((p) => p.label)).not.toContain(during[3]);
		expect(a.unsynced).toBeGreaterThan(0);
		expect(b.unsynced).toBeGreaterThan(0);
		expect(alive()).toBe(true);
		// Someone opening the board now cannot be checked: told to wait, not refused.
		const joiner = openProvider(app.url, f.boardIds[0], viewerCookie);
		providers.push(joiner);
		const joinerRefusals: string[] = [];
		joiner.on('refused', (r: string) => joinerRefusals.push(r));
		await waitFor(
			() => /handshake failed|join of board \S+ by .* failed/.test(app.output()),
			'the join or handshake answered "try again"',
			20_000
		);
		expect(joiner.status).toBe('connecting');

		cluster = startCluster({ dir: '.data/pg-outage', port, dbName: 'postgres', log: () => {} });
		const ok = await waitFor(
			async () => {
				const r = await health();
				return r.status === 200 ? r : null;
			},
			'health ok after the restart',
			30_000
		);
		expect(ok!.body).toMatchObject({ status: 'ok', down: [] });
		await settled('after the restart', 30_000);
		expect(a.delayed).toBeNull();
		const labels = readBoard(a.doc).points.map((p) => p.label);
		for (const l of made) expect(labels).toContain(l);
		expect(alive()).toBe(true);

		// The one who tried to open the board during the outage gets in by itself.
		await joiner.whenSynced();
		expect(joinerRefusals).toEqual([]);
		await waitFor(() => isDeepStrictEqual(content(joiner.doc), content(a.doc)), 'the late joiner has everything');
		// Every lost connection was handled where it happened: the process-level last resort never fired.
		expect(app.output()).not.toMatch(/Unhandled 'error' event|uncaught exception|unhandled rejection/i);
	});
});
