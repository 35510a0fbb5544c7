// The server owns the board: every refusal of the board policy reproduced through the real
// socket, as an attacker's raw client would send it, with nothing stored; the engineer's same
// operations accepted; changes under someone else's Yjs client id refused; and a board stored
// before the policy existed still opens and takes edits.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import * as encoding from 'lib0/encoding';
import * as syncProtocol from 'y-protocols/sync';
import { io as connect, type Socket } from 'socket.io-client';
import { sql } from 'kysely';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import {
	createBoardFixture,
	openProvider,
	readBoardContent,
	sessionCookie,
	storedDoc,
	waitFor,
	type BoardFixture
} from '../helpers/collab';
import { addPoint, addRoute, decidePoint, deletePoint, maps, readBoard, setEditor, updatePoint } from '../../src/lib/board/model';
import { EVENT_JOIN, EVENT_MESSAGE, MESSAGE_SYNC, type JoinReply, type MessageAck } from '../../src/lib/board/sync/protocol';
import type { BoardProvider } from '../../src/lib/board/sync/provider';

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
const cookies: Record<string, string> = {};
const sockets: Socket[] = [];
const providers: BoardProvider[] = [];

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url, env: { COLLAB_MAX_POINTS: '40' } });
	f = await createBoardFixture(t.db, { boards: 4 });
	for (const role of ['engineer', 'technician', 'viewer'] as const) cookies[role] = await sessionCookie(app.url, f.people[role]);
});
afterAll(async () => {
	for (const s of sockets) s.disconnect();
	await Promise.all(providers.map((p) => p.destroy()));
	await app?.stop();
	await t?.drop();
});

/** A raw socket.io client on a board: it sends whatever bytes it is given. */
async function rawClient(role: 'engineer' | 'technician' | 'viewer', boardId: string) {
	const socket = connect(app.url, {
		transports: ['websocket'],
		extraHeaders: { cookie: cookies[role] },
		forceNew: true,
		reconnection: false
	});
	sockets.push(socket);
	await new Promise<void>((resolve, reject) => {
		socket.once('connect', () => resolve());
		socket.once('connect_error', reject);
	});
	const reply = (await socket.emitWithAck(EVENT_JOIN, { boardId })) as JoinReply;
	if (!reply.ok) throw new Error(reply.error);
	// The client's copy of the board: after a refusal it starts again from what the server stores.
	let doc = new Y.Doc();
	Y.applyUpdate(doc, Y.encodeStateAsUpdate(await storedDoc(t.db, boardId)));
	const send = async (change: (d: Y.Doc) => void): Promise<MessageAck> => {
		let update: Uint8Array | null = null;
		const on = (u: Uint8Array) => (update = update ? Y.mergeUpdates([update, u]) : u);
		doc.on('update', on);
		change(doc);
		doc.off('update', on);
		if (!update) throw new Error('the change changed nothing');
		const ack = await sendRaw(update);
		if (!ack.ok) {
			doc = new Y.Doc();
			Y.applyUpdate(doc, Y.encodeStateAsUpdate(await storedDoc(t.db, boardId)));
		}
		return ack;
	};
	const sendRaw = (update: Uint8Array): Promise<MessageAck> => {
		const e = encoding.createEncoder();
		encoding.writeVarUint(e, MESSAGE_SYNC);
		syncProtocol.writeUpdate(e, update);
		return socket.timeout(10_000).emitWithAck(EVENT_MESSAGE, encoding.toUint8Array(e)) as Promise<MessageAck>;
	};
	return {
		socket,
		get doc() {
			return doc;
		},
		send,
		sendRaw
	};
}

async function logRows(boardId: string) {
	const r = await sql<{ n: string }>`select count(*)::text as n from board_update where board_id = ${boardId}`.execute(t.db);
	return Number(r.rows[0].n);
}

const refusedWith = (ack: MessageAck, pattern: RegExp) => {
	expect(ack.ok).toBe(false);
	expect('refused' in ack ? ack.refused : '').toMatch(pattern);
};

/** An approved point (P1) with a cable route, a flagged one (P2) and a rejected one (P3), by the engineer. */
async function reviewedBoard(boardId: string) {
	const eng = await rawClient('engineer', boardId);
	let p1 = '';
	let p2 = '';
	let p3 = '';
	let r1 = '';
	expect(
		await eng.send((d) => {
			p1 = addPoint(d, { x: 100, y: 100, label: 'P1', flatDiameterMm: 40 });
			p2 = addPoint(d, { x: 200, y: 100, label: 'P2' });
			p3 = addPoint(d, { x: 300, y: 100, label: 'P3' });
			r1 = addRoute(d, {
				pointId: p1,
				vertices: [
					[100, 100],
					[400, 400]
				]
			});
		})
	).toEqual({ ok: true });
	const esme = { userId: f.people.engineer.userId, name: f.people.engineer.name };
	expect(await eng.send((d) => decidePoint(d, p1, 'approved', esme))).toEqual({ ok: true });
	expect(await eng.send((d) => decidePoint(d, p2, 'flagged', { ...esme, reason: 'sheet_cover' }))).toEqual({ ok: true });
	expect(await eng.send((d) => decidePoint(d, p3, 'rejected', { ...esme, reason: 'too_far' }))).toEqual({ ok: true });
	return { eng, p1, p2, p3, r1 };
}

describe('the board policy on the server, through the real socket', () => {
	it('refuses a technician deleting, editing or un-deciding decided points, and stores nothing of it', async () => {
		const boardId = f.boardIds[0];
		const { p1, p2, p3, r1 } = await reviewedBoard(boardId);
		const tech = await rawClient('technician', boardId);
		const rows = await logRows(boardId);
		refusedWith(await tech.send((d) => deletePoint(d, p1)), /P1 was approved by .* and cannot be deleted; ask .* to reopen it/);
		refusedWith(await tech.send((d) => updatePoint(d, p1, { flatDiameterMm: 10 })), /P1 was approved .* cannot be changed/);
		refusedWith(
			await tech.send((d) => updatePoint(d, p2, { status: 'proposed' })),
			/P2 was flagged for a look .* can only be reopened by an engineer/
		);
		refusedWith(await tech.send((d) => updatePoint(d, p3, { status: 'proposed' })), /P3 was rejected/);
		refusedWith(await tech.send((d) => updatePoint(d, p2, { status: 'approved' })), /P2 was flagged/);
		refusedWith(await tech.send((d) => maps(d).routes.delete(r1)), /P1 was approved .* keeps its cable route/);
		expect(await logRows(boardId)).toBe(rows);
		const stored = readBoard(await storedDoc(t.db, boardId));
		expect(stored.points.map((p) => [p.label, p.status, p.flatDiameterMm]).sort()).toEqual([
			['P1', 'approved', 40],
			['P2', 'flagged', null],
			['P3', 'rejected', null]
		]);
		expect(stored.routes).toHaveLength(1);
	});

	it('accepts the engineer’s same operations', async () => {
		const boardId = f.boardIds[1];
		const { eng, p1, p2, p3 } = await reviewedBoard(boardId);
		expect(await eng.send((d) => updatePoint(d, p1, { flatDiameterMm: 10 }))).toEqual({ ok: true });
		expect(await eng.send((d) => updatePoint(d, p2, { status: 'proposed' }))).toEqual({ ok: true });
		expect(await eng.send((d) => deletePoint(d, p3))).toEqual({ ok: true });
		const stored = readBoard(await storedDoc(t.db, boardId));
		// Points placed in one change share a time; the order of the list is by label here.
		expect(stored.points.map((p) => [p.label, p.status, p.flatDiameterMm]).sort()).toEqual([
			['P1', 'approved', 10],
			['P2', 'proposed', null]
		]);
	});

	it('refuses wrong types, unknown roots and keys, over-long strings, bad coordinates and too many points', async () => {
		const boardId = f.boardIds[2];
		const tech = await rawClient('technician', boardId);
		let id = '';
		expect(await tech.send((d) => (id = addPoint(d, { x: 10, y: 10, label: 'T1' })))).toEqual({ ok: true });
		const rows = await logRows(boardId);
		const field = (key: string, value: unknown) => (d: Y.Doc) => maps(d).points.get(id)!.set(key, value);
		refusedWith(await tech.send(field('distanceToBearingMm', '60')), /Distance to bearing/);
		refusedWith(await tech.send(field('label', 'x'.repeat(50 * 1024))), /label|Label/);
		refusedWith(await tech.send(field('x', Number.NaN)), /Position/);
		refusedWith(await tech.send(field('secret', 'value')), /.+/);
		refusedWith(await tech.send((d) => d.getMap('payload').set('a', 1)), /.+/);
		refusedWith(await tech.send((d) => d.getText('junk').insert(0, 'hello')), /.+/);
		// 40 points at most on this server (COLLAB_MAX_POINTS): growth past it is refused.
		refusedWith(
			await tech.send((d) => {
				for (let i = 0; i < 45; i++) addPoint(d, { x: i, y: i, label: `M${i}` });
			}),
			/40/
		);
		expect(await logRows(boardId)).toBe(rows);
		const stored = await storedDoc(t.db, boardId);
		expect([...stored.share.keys()].filter((k) => !['points', 'routes', 'zones', 'meta'].includes(k))).toEqual([]);
		expect(readBoard(stored).points.map((p) => p.label)).toEqual(['T1']);
	});

	it('refuses a change written under someone else’s Yjs client id; the same change under one’s own id is stored', async () => {
		const boardId = f.boardIds[3];
		const eng = await rawClient('engineer', boardId);
		let id = '';
		expect(await eng.send((d) => (id = addPoint(d, { x: 10, y: 10, label: 'E1' })))).toEqual({ ok: true });
		const engineersId = eng.doc.clientID;

		// The technician's client forges the engineer's client id for a harmless edit.
		const tech = await rawClient('technician', boardId);
		const forged = new Y.Doc();
		Y.applyUpdate(forged, Y.encodeStateAsUpdate(tech.doc));
		forged.clientID = engineersId;
		let update: Uint8Array | null = null;
		forged.on('update', (u: Uint8Array) => (update = u));
		updatePoint(forged, id, { notes: 'written as the engineer' });
		const rows = await logRows(boardId);
		refusedWith(await tech.sendRaw(update!), /another person’s editing id/);
		expect(await logRows(boardId)).toBe(rows);
		expect((await readBoardContent(t.db, boardId)).points[0].notes).toBe('');

		// Under its own id the same edit is fine, and that id is now the technician's.
		expect(await tech.send((d) => updatePoint(d, id, { notes: 'written as myself' }))).toEqual({ ok: true });
		expect((await readBoardContent(t.db, boardId)).points[0].notes).toBe('written as myself');
		const owners = await t.db.selectFrom('board_client').select(['client_id', 'user_id']).where('board_id', '=', boardId).execute();
		expect(owners).toEqual(
			expect.arrayContaining([
				{ client_id: String(engineersId), user_id: f.people.engineer.userId },
				{ client_id: String(tech.doc.clientID), user_id: f.people.technician.userId }
			])
		);
		// And the engineer cannot write under the technician's id either.
		const back = new Y.Doc();
		Y.applyUpdate(back, Y.encodeStateAsUpdate(tech.doc));
		back.clientID = tech.doc.clientID;
		let u2: Uint8Array | null = null;
		back.on('update', (u: Uint8Array) => (u2 = u));
		updatePoint(back, id, { notes: 'engineer as technician' });
		refusedWith(await eng.sendRaw(u2!), /another person’s editing id/);
	});

	it('a viewer’s change is refused as read-only', async () => {
		const viewer = await rawClient('viewer', f.boardIds[2]);
		const ack = await viewer.send((d) => addPoint(d, { x: 1, y: 1 }));
		expect(ack).toMatchObject({ ok: false, readOnly: true });
	});
});

describe('a board stored before the board policy', () => {
	it('opens, and takes edits from the technician and the engineer', async () => {
		// Content as the earlier model wrote it: no editor names, no decision records, and under a
		// client id nobody has claimed.
		const old = new Y.Doc();
		old.transact(() => {
			const p = new Y.Map<unknown>();
			maps(old).points.set('legacy-point-1', p);
			for (const [k, v] of Object.entries({ label: 'P1', x: 120, y: 80, status: 'approved', createdBy: 'u-old', createdAt: 1, notes: '' }))
				p.set(k, v);
			const q = new Y.Map<unknown>();
			maps(old).points.set('legacy-point-2', q);
			for (const [k, v] of Object.entries({ label: 'P2', x: 220, y: 80, status: 'proposed', createdBy: 'u-old', createdAt: 2, notes: '' }))
				q.set(k, v);
		});
		const fixture = await createBoardFixture(t.db, { boards: 1, name: 'Legacy' });
		const boardId = fixture.boardIds[0];
		await t.db
			.updateTable('board')
			.set({ snapshot: Buffer.from(Y.encodeStateAsUpdate(old)) })
			.where('id', '=', boardId)
			.execute();
		const techCookie = await sessionCookie(app.url, fixture.people.technician);
		const engCookie = await sessionCookie(app.url, fixture.people.engineer);
		const tech = openProvider(app.url, boardId, techCookie, { offline: false });
		const eng = openProvider(app.url, boardId, engCookie, { offline: false });
		providers.push(tech, eng);
		await Promise.all([tech.whenSynced(), eng.whenSynced()]);
		expect(readBoard(tech.doc).points.map((p) => [p.label, p.status])).toEqual([
			['P1', 'approved'],
			['P2', 'proposed']
		]);
		setEditor(tech.doc, fixture.people.technician.name);
		updatePoint(tech.doc, 'legacy-point-2', { notes: 'checked on site' });
		await waitFor(() => tech.unsynced === 0, 'the technician’s edit stored');
		updatePoint(eng.doc, 'legacy-point-1', { notes: 'engineer note' });
		await waitFor(() => eng.unsynced === 0, 'the engineer’s edit stored');
		const stored = readBoard(await storedDoc(t.db, boardId));
		expect(stored.points.map((p) => p.notes)).toEqual(['engineer note', 'checked on site']);
	});
});
