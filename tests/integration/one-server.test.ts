// One server process, one module instance: pages, the socket handshake and the live board share
// the app's pool (and lucia on it); the live board's writer and listener and the socket.io
// adapter have their own small pools. Each pool names itself to PostgreSQL, so what the process
// holds is visible in pg_stat_activity.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { createBoardFixture, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, readBoard } from '../../src/lib/board/model';
import type { BoardProvider } from '../../src/lib/board/sync/provider';
import { ADAPTER_POOL_NAME, APP_POOL_NAME, COLLAB_POOL_NAME, TOOL_POOL_NAME } from '../../src/lib/server/db/index';

const PROBE_NAME = 'spotface-pool-probe';
const APP_POOL_SIZE = 2;

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
const providers: BoardProvider[] = [];

beforeAll(async () => {
	t = await createTestDatabase();
	f = await createBoardFixture(t.db);
	app = await startApp({ databaseUrl: t.url, env: { DATABASE_POOL_SIZE: String(APP_POOL_SIZE) } });
});
afterAll(async () => {
	for (const p of providers) p.destroy();
	await app?.stop();
	await t?.drop();
});

/** Connections to the test database, by application_name (this probe's own left out). */
async function connectionsByName(): Promise<Map<string, number>> {
	const u = new URL(t.url);
	u.searchParams.set('application_name', PROBE_NAME);
	const c = new pg.Client({ connectionString: u.toString() });
	await c.connect();
	try {
		const r = await c.query<{ name: string; n: string }>(
			`select application_name as name, count(*)::text as n from pg_stat_activity
			 where datname = current_database() and backend_type = 'client backend' and pid <> pg_backend_pid()
			 group by application_name`
		);
		return new Map(r.rows.map((x) => [x.name, Number(x.n)]));
	} finally {
		await c.end();
	}
}

describe('one server process', () => {
	it('opens only its named pools, and pages and the live board share the one app pool', async () => {
		const cookie = await sessionCookie(app.url, f.people.engineer);
		const boardId = f.boardIds[0];
		// Pages and socket handshakes at the same time: with a second app pool (a second copy of
		// the server modules) there would be more app connections than the pool size.
		const pages = Array.from({ length: 12 }, () =>
			fetch(`${app.url}/surveys/${f.surveyId}`, { headers: { cookie } }).then((r) => r.status)
		);
		for (let i = 0; i < 6; i++) providers.push(openProvider(app.url, boardId, cookie));
		const [statuses] = await Promise.all([Promise.all(pages), ...providers.map((p) => p.whenSynced())]);
		expect(statuses.every((s) => s === 200)).toBe(true);
		addPoint(providers[0].doc, { x: 10, y: 10, label: 'P1' });
		await waitFor(async () => readBoard(await storedDoc(t.db, boardId)).points.some((p) => p.label === 'P1'), 'the point stored');

		const byName = await waitFor(async (): Promise<Map<string, number> | null> => {
			const m = await connectionsByName();
			// The adapter's and the board-state listener's LISTEN connections are up.
			return (m.get(COLLAB_POOL_NAME) ?? 0) > 0 && (m.get(ADAPTER_POOL_NAME) ?? 0) > 0 ? m : null;
		}, 'the live board pools connected').then((m) => m!);
		const appNames = [...byName.keys()].filter((n) => n !== TOOL_POOL_NAME).sort();
		// Every connection of the app process belongs to one of its named pools.
		expect(appNames).toEqual([ADAPTER_POOL_NAME, APP_POOL_NAME, COLLAB_POOL_NAME].sort());
		const appConnections = byName.get(APP_POOL_NAME)!;
		expect(appConnections).toBeGreaterThanOrEqual(1);
		expect(appConnections).toBeLessThanOrEqual(APP_POOL_SIZE);
		expect(byName.get(COLLAB_POOL_NAME)!).toBeLessThanOrEqual(4);
		expect(byName.get(ADAPTER_POOL_NAME)!).toBeLessThanOrEqual(4);
	});
});
