// GET /surveys/{id}/boards/{boardId}/state: the board's stored state for the page to draw from
// before the live sync joins. The same checks as the board page (signed in, a role that reads
// boards, the board of that survey in the member's organisation), and what it gives, applied,
// is what storage holds, snapshot and log.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { createBoardFixture, openProvider, PASSWORD, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, readBoard } from '../../src/lib/board/model';
import type { BoardProvider } from '../../src/lib/board/sync/provider';
import { decodeStoredState, STORED_STATE_TYPE } from '../../src/lib/board/sync/stored-state';

let t: TestDatabase;
let app: RunningApp;
let a: BoardFixture;
let b: BoardFixture;
const open: BoardProvider[] = [];

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	a = await createBoardFixture(t.db, { name: 'Harrowgate Water Services' });
	b = await createBoardFixture(t.db, { name: 'Other Water Company' });
	// A snapshot (as compaction leaves it) with two points.
	const doc = new Y.Doc();
	addPoint(doc, { x: 100, y: 100, label: 'P1' });
	addPoint(doc, { x: 200, y: 100, label: 'P2' });
	await t.db
		.updateTable('board')
		.set({ snapshot: Buffer.from(Y.encodeStateAsUpdate(doc)) })
		.where('id', '=', a.boardIds[0])
		.execute();
});
afterAll(async () => {
	await Promise.all(open.map((p) => p.destroy()));
	await app?.stop();
	await t?.drop();
});

async function as(person: { email: string }) {
	const c = new Client(app.url);
	await c.signIn(person.email, PASSWORD);
	return c;
}
const path = (surveyId: string, boardId: string) => `/surveys/${surveyId}/boards/${boardId}/state`;

describe('the board state for the page', () => {
	it('gives the snapshot and the log as stored, and nothing more is sent back after the sync', async () => {
		const boardId = a.boardIds[0];
		// A third point through the live board: it goes to the log.
		const writer = openProvider(app.url, boardId, await sessionCookie(app.url, a.people.technician));
		open.push(writer);
		await writer.whenSynced();
		addPoint(writer.doc, { x: 300, y: 100, label: 'P3' });
		await waitFor(async () => readBoard(await storedDoc(t.db, boardId)).points.length === 3, 'P3 is stored');

		const res = await (await as(a.people.engineer)).request(path(a.surveyId, boardId));
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe(STORED_STATE_TYPE);
		expect(res.headers.get('cache-control')).toMatch(/no-store/);
		const updates = decodeStoredState(new Uint8Array(await res.arrayBuffer()));
		expect(updates.length).toBeGreaterThanOrEqual(2); // the snapshot and at least one log row

		// A fresh page's provider takes it before joining; the sync then has nothing for the server.
		const reader = openProvider(app.url, boardId, await sessionCookie(app.url, a.people.engineer), { connect: false });
		open.push(reader);
		expect(reader.applyStoredState(updates)).toBe(updates.length);
		expect(readBoard(reader.doc)).toEqual(readBoard(await storedDoc(t.db, boardId)));
		const rowsBefore = await t.db.selectFrom('board_update').select('seq').where('board_id', '=', boardId).execute();
		reader.connect();
		await reader.whenSynced();
		expect(reader.unsynced).toBe(0);
		const rowsAfter = await t.db.selectFrom('board_update').select('seq').where('board_id', '=', boardId).execute();
		expect(rowsAfter.length).toBe(rowsBefore.length);
		// Once synced, a late copy of the stored state is not applied again.
		expect(reader.applyStoredState(updates)).toBe(0);
	});

	it('is there for every role that reads boards, the viewer included', async () => {
		const res = await (await as(a.people.viewer)).request(path(a.surveyId, a.boardIds[0]));
		expect(res.status).toBe(200);
	});

	it('is 401 signed out, and 404 for another organisation, another survey or no such board', async () => {
		const anon = await new Client(app.url).request(path(a.surveyId, a.boardIds[0]));
		expect(anon.status).toBe(401);

		const other = await as(b.people.engineer);
		const cases = [
			path(a.surveyId, a.boardIds[0]), // another organisation's board
			path(b.surveyId, a.boardIds[0]), // through their own survey
			path(a.surveyId, b.boardIds[0]) // their own board under another organisation's survey
		];
		const statuses = await Promise.all(cases.map(async (p) => (await other.request(p)).status));
		expect(statuses).toEqual([404, 404, 404]);

		const mine = await as(a.people.engineer);
		expect((await mine.request(path(b.surveyId, a.boardIds[0]))).status).toBe(404);
		expect((await mine.request(path(a.surveyId, '00000000-0000-4000-8000-000000000000'))).status).toBe(404);
		expect((await mine.request(path(b.surveyId, b.boardIds[0]))).status).toBe(404);
	});
});
