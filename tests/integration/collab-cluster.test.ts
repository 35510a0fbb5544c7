// Scale-out: two server processes on different ports with one database keep a board's room in
// step through the socket.io PostgreSQL adapter.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { isDeepStrictEqual } from 'node:util';
import * as Y from 'yjs';
import { appendUpdates } from '../../src/lib/server/collab/persistence';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { content, createBoardFixture, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, maps, movePoint, updatePoint } from '../../src/lib/board/model';
import type { BoardProvider } from '../../src/lib/board/sync/provider';

let t: TestDatabase;
let one: RunningApp;
let two: RunningApp;
let f: BoardFixture;
const open: BoardProvider[] = [];

function provider(url: string, boardId: string, cookie: string, extra = {}) {
	const p = openProvider(url, boardId, cookie, extra);
	open.push(p);
	return p;
}

beforeAll(async () => {
	t = await createTestDatabase();
	// Catch-up re-reads every 700 ms here, so the healing test is quick; the relay test below
	// finishes well before a first catch-up could matter (it asserts within 500 ms).
	const env = { COLLAB_CATCH_UP_MS: '700', COLLAB_UNLOAD_GRACE_MS: '200' };
	[one, two] = await Promise.all([startApp({ databaseUrl: t.url, env }), startApp({ databaseUrl: t.url, env })]);
	f = await createBoardFixture(t.db);
});
afterAll(async () => {
	await Promise.all(open.map((p) => p.destroy()));
	await Promise.all([one?.stop(), two?.stop()]);
	await t?.drop();
});

describe('two server processes, one database', () => {
	it('a client on each converges, with presence across processes, and a late joiner gets the full state', async () => {
		expect(one.port).not.toBe(two.port);
		const boardId = f.boardIds[0];
		// A session made on one process is good on the other (same database).
		const a = provider(one.url, boardId, await sessionCookie(one.url, f.people.engineer), { user: { name: 'E', color: '#123456' } });
		const b = provider(two.url, boardId, await sessionCookie(two.url, f.people.technician), { user: { name: 'T', color: '#654321' } });
		await Promise.all([a.whenSynced(), b.whenSynced()]);

		const p1 = addPoint(a.doc, { x: 1, y: 1, label: 'P1' });
		await waitFor(() => maps(b.doc).points.has(p1), 'a’s point on b (other process)', 500);
		const p2 = addPoint(b.doc, { x: 2, y: 2, label: 'P2' });
		await waitFor(() => maps(a.doc).points.has(p2), 'b’s point on a (other process)', 500);

		// Concurrent edits on both sides.
		for (let i = 0; i < 20; i++) {
			movePoint(a.doc, p1, 10 + i, 10);
			updatePoint(b.doc, p1, { notes: `note ${i}` });
			addPoint(i % 2 ? a.doc : b.doc, { x: i, y: 100, label: `Q${i}` });
		}
		await waitFor(() => a.unsynced === 0 && b.unsynced === 0, 'all stored');
		await waitFor(() => isDeepStrictEqual(content(a.doc), content(b.doc)), 'convergence across processes');
		expect(maps(a.doc).points.size).toBe(22);
		expect(content(await storedDoc(t.db, boardId))).toEqual(content(a.doc));

		// Presence crosses processes too.
		a.awareness.setLocalStateField('cursor', { x: 5, y: 6 });
		await waitFor(() => b.awareness.getStates().get(a.awareness.clientID)?.cursor?.x === 5, 'a’s cursor on b');

		// A late joiner on the second process sees everything, from its in-memory room.
		const c = provider(two.url, boardId, await sessionCookie(two.url, f.people.viewer));
		await c.whenSynced();
		expect(content(c.doc)).toEqual(content(a.doc));
		expect(c.awareness.getStates().get(a.awareness.clientID)?.cursor).toEqual({ x: 5, y: 6 });

		// Leaving on one process clears the presence on the other.
		await a.destroy();
		await waitFor(() => !b.awareness.getStates().has(a.awareness.clientID), 'a’s presence gone on b');
		// All of it came through the adapter: the log re-read never had anything to add.
		expect(one.output() + two.output()).not.toMatch(/caught up/);
	});

	it('a process that opens a board late learns who is already there on the other', async () => {
		const g = await createBoardFixture(t.db, { name: 'Presence Works' });
		const a = provider(one.url, g.boardIds[0], await sessionCookie(one.url, g.people.engineer), { user: { name: 'E', color: '#123456' } });
		await a.whenSynced();
		a.awareness.setLocalStateField('selection', ['p-7']);
		await new Promise((r) => setTimeout(r, 300));
		// The board is not open on the second process until this client arrives.
		expect(two.output()).not.toContain(`loaded board ${g.boardIds[0]}`);
		const b = provider(two.url, g.boardIds[0], await sessionCookie(two.url, g.people.technician));
		await b.whenSynced();
		// Well before a's next renewal (every 15 s).
		await waitFor(() => b.awareness.getStates().get(a.awareness.clientID)?.selection?.[0] === 'p-7', 'a’s presence on a fresh room', 3000);
	});

	it('heals a lost cross-process notification by re-reading the log', async () => {
		const boardId = f.boardIds[0];
		const a = provider(one.url, boardId, await sessionCookie(one.url, f.people.engineer));
		const b = provider(two.url, boardId, await sessionCookie(two.url, f.people.technician));
		await Promise.all([a.whenSynced(), b.whenSynced()]);
		// An update stored by a third process that died before it could tell anyone.
		const ghost = new Y.Doc();
		Y.applyUpdate(ghost, Y.encodeStateAsUpdate(a.doc));
		const id = addPoint(ghost, { x: 9, y: 9, label: 'from elsewhere' });
		const cookie = await sessionCookie(one.url, f.people.admin);
		const sessionId = cookie.split('=')[1];
		const [seq] = await appendUpdates(t.pool, [
			{
				boardId,
				organisationId: f.organisationId,
				userId: f.people.admin.userId,
				sessionId,
				update: Y.encodeStateAsUpdate(ghost, Y.encodeStateVector(a.doc))
			}
		]);
		expect(seq).not.toBeNull();
		await waitFor(() => maps(a.doc).points.has(id) && maps(b.doc).points.has(id), 'both processes caught up', 5000);
		expect(one.output() + two.output()).toMatch(/caught up 1 change/);
	});
});
