// Review decisions on a point (approved, rejected, flagged) are the engineer's: the server
// refuses them from a technician however the client was built, and rolls the client back.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { createBoardFixture, next, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, maps, updatePoint } from '../../src/lib/board/model';
import type { BoardProvider } from '../../src/lib/board/sync/provider';

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
const cookies: Record<string, string> = {};
const open: BoardProvider[] = [];

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	f = await createBoardFixture(t.db, { boards: 1 });
	for (const role of ['engineer', 'technician'] as const) cookies[role] = await sessionCookie(app.url, f.people[role]);
});
afterAll(async () => {
	await Promise.all(open.map((p) => p.destroy()));
	await app?.stop();
	await t?.drop();
});

function provider(cookie: string) {
	const p = openProvider(app.url, f.boardIds[0], cookie, { offline: false });
	open.push(p);
	return p;
}

const statusOf = (doc: import('yjs').Doc, id: string) =>
	(maps(doc).points.get(id) as import('yjs').Map<unknown> | undefined)?.get('status');

describe('review decisions on the live board', () => {
	it("a technician's approval of a point is refused and rolled back; the proposal stays", async () => {
		const tech = provider(cookies.technician);
		const eng = provider(cookies.engineer);
		await Promise.all([tech.whenSynced(), eng.whenSynced()]);
		const id = addPoint(tech.doc, { x: 50, y: 60, component: 'Pump DE' });
		await waitFor(() => maps(eng.doc).points.has(id), 'the proposed point reaches the engineer');

		const refused = next(tech, 'refused');
		updatePoint(tech.doc, id, { status: 'approved' });
		const [reason] = await refused;
		expect(String(reason)).toMatch(/Only an engineer can mark P1 as approved/);
		await tech.whenSynced();
		expect(statusOf(tech.doc, id)).toBe('proposed'); // rolled back to the server's state
		expect(tech.readOnly).toBe(false); // other edits still go through

		// Not stored, and the engineer never saw it. (Peers see the proposal as soon as it is checked;
		// its commit may land a moment later.)
		await waitFor(async () => statusOf(await storedDoc(t.db, f.boardIds[0]), id) !== undefined, 'the proposal stored');
		const stored = await storedDoc(t.db, f.boardIds[0]);
		expect(statusOf(stored, id)).toBe('proposed');
		expect(statusOf(eng.doc, id)).toBe('proposed');

		// A point created already "approved" is refused the same way.
		const refusedAgain = next(tech, 'refused');
		addPoint(tech.doc, { x: 80, y: 90, status: 'approved' });
		expect(String((await refusedAgain)[0])).toMatch(/approved/);
		await tech.whenSynced();

		// The technician can still make ordinary edits after a refusal.
		updatePoint(tech.doc, id, { notes: 'seat looks flat' });
		await waitFor(
			() => (maps(eng.doc).points.get(id) as import('yjs').Map<unknown>).get('notes') === 'seat looks flat',
			'the note reaches the engineer'
		);
	});

	it('the engineer may approve, flag and reject', async () => {
		const eng = provider(cookies.engineer);
		const tech = provider(cookies.technician);
		await Promise.all([eng.whenSynced(), tech.whenSynced()]);
		const id = addPoint(tech.doc, { x: 120, y: 60 });
		await waitFor(() => maps(eng.doc).points.has(id), 'the point reaches the engineer');
		for (const status of ['flagged', 'rejected', 'approved'] as const) {
			updatePoint(eng.doc, id, { status });
			await waitFor(() => statusOf(tech.doc, id) === status, `${status} reaches the technician`);
		}
		const stored = await storedDoc(t.db, f.boardIds[0]);
		expect(statusOf(stored, id)).toBe('approved');
	});
});
