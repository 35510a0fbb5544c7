// Working without a connection: edits made while disconnected merge with what others did
// online once the client is back, on both sides and in storage; in a browser the offline copy
// lives in IndexedDB (fake-indexeddb here) and survives closing the board.
import 'fake-indexeddb/auto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { isDeepStrictEqual } from 'node:util';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { content, createBoardFixture, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, maps, movePoint, readBoard, updatePoint } from '../../src/lib/board/model';
import { BoardProvider } from '../../src/lib/board/sync/provider';

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
let tech: string;
let eng: string;
const open: BoardProvider[] = [];

function provider(boardId: string, cookie: string, extra = {}) {
	const p = openProvider(app.url, boardId, cookie, extra);
	open.push(p);
	return p;
}

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	f = await createBoardFixture(t.db, { boards: 2 });
	tech = await sessionCookie(app.url, f.people.technician);
	eng = await sessionCookie(app.url, f.people.engineer);
});
afterAll(async () => {
	await Promise.all(open.map((p) => p.destroy()));
	await app?.stop();
	await t?.drop();
});

describe('offline merge', () => {
	it('a client edits while disconnected, another edits online, both reconnect, both edits survive', async () => {
		const boardId = f.boardIds[0];
		const field = provider(boardId, tech);
		const office = provider(boardId, eng);
		await Promise.all([field.whenSynced(), office.whenSynced()]);
		const shared = addPoint(office.doc, { x: 50, y: 50, label: 'P1' });
		await waitFor(() => maps(field.doc).points.has(shared), 'shared point in the plant room');

		// The plant room loses its signal.
		field.disconnect();
		expect(field.status).toBe('disconnected');
		const offlinePoint = addPoint(field.doc, { x: 10, y: 20, label: 'P2', notes: 'added in the plant room' });
		movePoint(field.doc, shared, 55, 60);
		updatePoint(field.doc, shared, { wallThicknessMm: 12 });
		expect(field.unsynced).toBe(3);

		// Meanwhile, online.
		const onlinePoint = addPoint(office.doc, { x: 300, y: 30, label: 'P3' });
		updatePoint(office.doc, shared, { notes: 'check the guard' });
		await waitFor(() => office.unsynced === 0, 'office edits stored');
		expect(maps(field.doc).points.has(onlinePoint)).toBe(false);

		// Both drop and come back (the office too, so each side merges on reconnect).
		office.disconnect();
		office.connect();
		field.connect();
		await Promise.all([field.whenSynced(), office.whenSynced()]);
		await waitFor(() => field.unsynced === 0, 'offline edits acknowledged');
		await waitFor(() => isDeepStrictEqual(content(field.doc), content(office.doc)), 'both sides equal');

		const board = readBoard(office.doc);
		expect(board.points.map((p) => p.id).sort()).toEqual([shared, offlinePoint, onlinePoint].sort());
		const p1 = board.points.find((p) => p.id === shared)!;
		expect([p1.x, p1.y, p1.wallThicknessMm, p1.notes]).toEqual([55, 60, 12, 'check the guard']);
		expect(board.points.find((p) => p.id === offlinePoint)!.notes).toBe('added in the plant room');
		// And the server stored the merge.
		expect(content(await storedDoc(t.db, boardId))).toEqual(content(office.doc));
	});

	it('keeps the board in IndexedDB: edits made with no server at all reach it later', async () => {
		const boardId = f.boardIds[1];
		// Opened in the plant room with no connection at all.
		const first = new BoardProvider({ serverUrl: app.url, boardId, doc: new Y.Doc(), cookie: tech, offline: true, connect: false });
		await first.whenLocalLoaded();
		const id = addPoint(first.doc, { x: 1, y: 2, label: 'P1', notes: 'offline only' });
		expect(first.unsynced).toBe(1);
		await first.destroy();

		// The board is closed and opened again: the offline copy is still there.
		const again = new BoardProvider({ serverUrl: app.url, boardId, doc: new Y.Doc(), cookie: tech, offline: true, connect: false });
		open.push(again);
		await again.whenLocalLoaded();
		expect(maps(again.doc).points.has(id)).toBe(true);
		// Loaded from the device, not a change of this session.
		expect(again.unsynced).toBe(0);

		// Back in range.
		again.connect();
		await again.whenSynced();
		const other = provider(boardId, eng);
		await other.whenSynced();
		await waitFor(() => maps(other.doc).points.has(id), 'the offline point on the server');
		expect(readBoard(await storedDoc(t.db, boardId)).points.map((p) => p.notes)).toEqual(['offline only']);
	});
});
