// The live board over real sockets against the built app: convergence, late joiners, presence
// and the permission rules for joining and for every update.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { isDeepStrictEqual } from 'node:util';
import { io as connect } from 'socket.io-client';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { content, createBoardFixture, next, openProvider, PASSWORD, sessionCookie, waitFor, type BoardFixture } from '../helpers/collab';
import { Client } from '../helpers/http';
import { addPoint, movePoint, readBoard, updatePoint, maps } from '../../src/lib/board/model';
import { EVENT_JOIN, type JoinReply } from '../../src/lib/board/sync/protocol';
import type { BoardProvider } from '../../src/lib/board/sync/provider';
import { transitionSurvey } from '../../src/lib/server/review/workflow';

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
const cookies: Record<string, string> = {};
const open: BoardProvider[] = [];

function provider(boardId: string, cookie: string | undefined, extra = {}) {
	const p = openProvider(app.url, boardId, cookie, extra);
	open.push(p);
	return p;
}

async function storedRows(boardId: string) {
	return t.db.selectFrom('board_update').select(['seq', 'user_id']).where('board_id', '=', boardId).execute();
}

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url, env: { COLLAB_SESSION_CHECK_MS: '300' } });
	f = await createBoardFixture(t.db, { boards: 3 });
	for (const role of ['engineer', 'technician', 'viewer'] as const) cookies[role] = await sessionCookie(app.url, f.people[role]);
});
afterAll(async () => {
	await Promise.all(open.map((p) => p.destroy()));
	await app?.stop();
	await t?.drop();
});

describe('two clients on one board', () => {
	it('converge after concurrent edits to the same and to different points; a later client gets the full state', async () => {
		const boardId = f.boardIds[0];
		const a = provider(boardId, cookies.engineer);
		const b = provider(boardId, cookies.technician);
		await Promise.all([a.whenSynced(), b.whenSynced()]);
		expect(a.status).toBe('connected');
		expect(a.readOnly).toBe(false);

		// A shared point first, seen by both.
		const shared = addPoint(a.doc, { x: 100, y: 200, label: 'P1' });
		await waitFor(() => maps(b.doc).points.has(shared), 'the shared point on b');

		// Concurrent: both edit the same point (different and same fields) and each adds its own.
		updatePoint(a.doc, shared, { notes: 'seat ground flat' });
		movePoint(b.doc, shared, 140, 210);
		updatePoint(a.doc, shared, { component: 'motor drive-end bearing' });
		updatePoint(b.doc, shared, { component: 'motor DE bearing housing' });
		const onlyA = addPoint(a.doc, { x: 300, y: 50, label: 'P2' });
		const onlyB = addPoint(b.doc, { x: 20, y: 400, label: 'P3' });

		await waitFor(() => a.unsynced === 0 && b.unsynced === 0, 'both acknowledged');
		await waitFor(() => isDeepStrictEqual(content(a.doc), content(b.doc)), 'convergence');

		const board = readBoard(a.doc);
		expect(board.points.map((p) => p.id).sort()).toEqual([shared, onlyA, onlyB].sort());
		const p = board.points.find((x) => x.id === shared)!;
		expect(p.notes).toBe('seat ground flat');
		expect([p.x, p.y]).toEqual([140, 210]);
		// Both wrote the same field at once: one value wins, the same on both sides.
		expect(['motor drive-end bearing', 'motor DE bearing housing']).toContain(p.component);
		expect(readBoard(b.doc).points.find((x) => x.id === shared)!.component).toBe(p.component);

		// Every acknowledged edit is stored, each under the member who made it.
		const rows = await storedRows(boardId);
		expect(rows.length).toBeGreaterThanOrEqual(7);
		expect(new Set(rows.map((r) => r.user_id))).toEqual(new Set([f.people.engineer.userId, f.people.technician.userId]));

		// A third client joining later gets everything.
		const c = provider(boardId, cookies.viewer);
		await c.whenSynced();
		expect(content(c.doc)).toEqual(content(a.doc));
	});

	it('shows who is here with their cursor and selection, under the signed-in name', async () => {
		const boardId = f.boardIds[1];
		const a = provider(boardId, cookies.engineer, { user: { name: 'Someone Else', color: '#1f77b4' } });
		const b = provider(boardId, cookies.technician, { user: { name: 'Teo', color: '#ff7f0e' } });
		await Promise.all([a.whenSynced(), b.whenSynced()]);
		a.awareness.setLocalStateField('cursor', { x: 12, y: 34 });
		a.awareness.setLocalStateField('selection', ['p-1']);
		const seen = await waitFor(() => {
			const s = b.awareness.getStates().get(a.awareness.clientID);
			return s?.cursor?.x === 12 && s.selection?.[0] === 'p-1' ? s : null;
		}, 'a’s cursor on b');
		// The name shown is the member's, whatever the client claimed; the colour is kept.
		expect(seen!.user).toMatchObject({ name: f.people.engineer.name, id: f.people.engineer.userId, color: '#1f77b4' });

		await a.destroy();
		await waitFor(() => !b.awareness.getStates().has(a.awareness.clientID), 'a gone from b’s presence');
	});
});

describe('permissions', () => {
	it('refuses a viewer’s update, stores nothing, and rolls the viewer back to the server state', async () => {
		const boardId = f.boardIds[1];
		const writer = provider(boardId, cookies.engineer);
		await writer.whenSynced();
		const kept = addPoint(writer.doc, { x: 5, y: 5, label: 'P9' });
		await waitFor(() => writer.unsynced === 0, 'writer acknowledged');

		const viewer = provider(boardId, cookies.viewer);
		await viewer.whenSynced();
		expect(viewer.readOnly).toBe(true);
		const before = (await storedRows(boardId)).length;
		const original = viewer.doc;

		const refused = next(viewer, 'refused');
		addPoint(viewer.doc, { x: 1, y: 1, label: 'sneaky' });
		const [reason, detail] = (await refused) as [string, { kind: string; doc: Y.Doc }];
		expect(reason).toMatch(/role/i);
		expect(detail.kind).toBe('update');
		// A fresh document with the server's state, without the refused point.
		expect(viewer.doc).not.toBe(original);
		expect(detail.doc).toBe(viewer.doc);
		expect([...maps(viewer.doc).points.keys()]).toContain(kept);
		expect(readBoard(viewer.doc).points.some((p) => p.label === 'sneaky')).toBe(false);
		expect(viewer.unsynced).toBe(0);
		expect((await storedRows(boardId)).length).toBe(before);
		// Nobody else saw it.
		expect(readBoard(writer.doc).points.some((p) => p.label === 'sneaky')).toBe(false);
		// The viewer still receives live edits on the swapped document.
		const later = addPoint(writer.doc, { x: 7, y: 7, label: 'P10' });
		await waitFor(() => maps(viewer.doc).points.has(later), 'live edit on the viewer');
	});

	it('refuses updates to an approved board and tells open clients it is read-only', async () => {
		const g = await createBoardFixture(t.db);
		const eng = await sessionCookie(app.url, g.people.engineer);
		const p = provider(g.boardIds[0], eng);
		await p.whenSynced();
		addPoint(p.doc, { x: 10, y: 10, label: 'P1' });
		await waitFor(() => p.unsynced === 0, 'acknowledged before approval');

		const readonly = next(p, 'readonly');
		const actor = { userId: g.people.engineer.userId, role: 'engineer' as const };
		await transitionSurvey(t.db, { organisationId: g.organisationId, surveyId: g.surveyId, name: 'submit', actor });
		await transitionSurvey(t.db, {
			organisationId: g.organisationId,
			surveyId: g.surveyId,
			name: 'approve',
			actor,
			confirmExceptions: true
		});
		const [isReadOnly, why] = (await readonly) as [boolean, string];
		expect(isReadOnly).toBe(true);
		expect(why).toMatch(/approved/i);

		const before = (await storedRows(g.boardIds[0])).length;
		const refused = next(p, 'refused');
		addPoint(p.doc, { x: 20, y: 20, label: 'P2' });
		const [reason] = (await refused) as [string];
		expect(reason).toMatch(/approved/i);
		expect((await storedRows(g.boardIds[0])).length).toBe(before);
		expect(readBoard(p.doc).points.map((x) => x.label)).toEqual(['P1']);

		// Joining afterwards: read-only from the start.
		const late = provider(g.boardIds[0], eng);
		await late.whenSynced();
		expect(late.readOnly).toBe(true);
	});

	it('refuses a socket without a session', async () => {
		const p = provider(f.boardIds[0], undefined);
		const [reason, detail] = (await next(p, 'refused')) as [string, { kind: string }];
		expect(reason).toMatch(/unauthorised/);
		expect(detail.kind).toBe('session');
		expect(p.status).toBe('refused');
	});

	it('keeps a member of another organisation out of the room', async () => {
		const other = await createBoardFixture(t.db, { name: 'Westgate Fans' });
		const outsider = await sessionCookie(app.url, other.people.admin);
		const p = provider(f.boardIds[0], outsider);
		const [reason, detail] = (await next(p, 'refused')) as [string, { kind: string }];
		expect(reason).toMatch(/not found/i);
		expect(detail.kind).toBe('join');

		// A raw socket that tries anyway gets nothing from the room.
		const socket = connect(app.url, { transports: ['websocket'], extraHeaders: { cookie: outsider }, forceNew: true, reconnection: false });
		let received = 0;
		socket.on('y', () => received++);
		await new Promise<void>((r) => socket.on('connect', () => r()));
		const reply = (await socket.emitWithAck(EVENT_JOIN, { boardId: f.boardIds[0] })) as JoinReply;
		expect(reply).toEqual({ ok: false, error: 'Board not found.' });
		const writer = provider(f.boardIds[0], cookies.engineer);
		await writer.whenSynced();
		addPoint(writer.doc, { x: 3, y: 3, label: 'P77' });
		await waitFor(() => writer.unsynced === 0, 'stored');
		// Messages before a join close the socket and change nothing.
		const closed = new Promise<string>((r) => socket.on('disconnect', (why) => r(why)));
		socket.emit('y', new Uint8Array([0, 2, 2, 0, 0]));
		expect(await closed).toBe('io server disconnect');
		expect(received).toBe(0);
	});

	it('signing out ends the live board connection too', async () => {
		const c = new Client(app.url);
		await c.signIn(f.people.technician.email, PASSWORD);
		const p = provider(f.boardIds[2], `spotface_session=${c.sessionCookie}`);
		await p.whenSynced();
		const refused = next(p, 'refused', 15_000);
		expect((await c.form('/sign-out', {})).status).toBe(303);
		// Closed by the session sweep; the reconnect is then refused by the handshake.
		const [reason, detail] = (await refused) as [string, { kind: string }];
		expect(detail.kind).toBe('session');
		expect(reason).toMatch(/unauthorised/);
		expect(app.output()).toMatch(/the session has ended/);
	});

	it('a technician can write; a role change to viewer takes effect on the next update', async () => {
		const g = await createBoardFixture(t.db, { name: 'Role Change Works' });
		const tech = await sessionCookie(app.url, g.people.technician);
		const p = provider(g.boardIds[0], tech);
		await p.whenSynced();
		addPoint(p.doc, { x: 1, y: 2, label: 'P1' });
		await waitFor(() => p.unsynced === 0, 'stored');
		await t.db.updateTable('member').set({ role: 'viewer' }).where('user_id', '=', g.people.technician.userId).execute();
		const refused = next(p, 'refused');
		addPoint(p.doc, { x: 3, y: 4, label: 'P2' });
		expect(((await refused) as [string])[0]).toMatch(/role/i);
		expect(p.readOnly).toBe(true);
		expect(await storedRows(g.boardIds[0])).toHaveLength(1);
	});
});
