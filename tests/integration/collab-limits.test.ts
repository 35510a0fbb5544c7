// Floods that stay under the message limits: byte budgets per connection and per board, the
// largest update and the largest document. Driven through the real socket as an attacker
// would (raw socket.io, many large updates) and with the provider as a person would (changes
// held back, kept and sent again). Small limits here so the test is quick; the defaults are in
// src/lib/server/collab/config.ts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import * as encoding from 'lib0/encoding';
import { randomBytes } from 'node:crypto';
import { isDeepStrictEqual } from 'node:util';
import { io as connect, type Socket } from 'socket.io-client';
import * as syncProtocol from 'y-protocols/sync';
import { sql } from 'kysely';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { content, createBoardFixture, next, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, readBoard } from '../../src/lib/board/model';
import { EVENT_JOIN, EVENT_MESSAGE, MESSAGE_SYNC, type JoinReply, type MessageAck } from '../../src/lib/board/sync/protocol';
import type { BoardProvider } from '../../src/lib/board/sync/provider';

const LIMITS = {
	COLLAB_MAX_UPDATE_BYTES: String(100 * 1024),
	COLLAB_MAX_DOCUMENT_BYTES: String(300 * 1024),
	COLLAB_SOCKET_BYTES_PER_SECOND: String(40 * 1024),
	COLLAB_SOCKET_BYTE_BURST: String(100 * 1024),
	COLLAB_BOARD_BYTES_PER_SECOND: String(200 * 1024),
	COLLAB_BOARD_BYTE_BURST: String(400 * 1024)
};

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
let tech: string;
let engineer: string;
const sockets: Socket[] = [];
const providers: BoardProvider[] = [];

async function joinedSocket(boardId: string): Promise<Socket> {
	const socket = connect(app.url, { transports: ['websocket'], extraHeaders: { cookie: tech }, forceNew: true, reconnection: false });
	sockets.push(socket);
	await new Promise<void>((resolve, reject) => {
		socket.once('connect', () => resolve());
		socket.once('connect_error', reject);
	});
	const reply = (await socket.emitWithAck(EVENT_JOIN, { boardId })) as JoinReply;
	if (!reply.ok) throw new Error(reply.error);
	return socket;
}

/** Adds points whose notes carry about `bytes` of fresh text (valid board content, each call new). */
function addNotes(doc: Y.Doc, bytes: number, label = 'N'): string[] {
	const ids: string[] = [];
	doc.transact(() => {
		// A point with 2,000 characters of notes encodes to about 2.4 KB.
		for (let left = bytes, i = 0; left > 0; left -= 2450, i++) {
			const notes = randomBytes(1000)
				.toString('hex')
				.slice(0, Math.min(2000, Math.max(1, left - 450)));
			ids.push(addPoint(doc, { x: i, y: i, label: `${label}${i + 1}`.slice(0, 40), notes }));
		}
	});
	return ids;
}

/** A sync update carrying about `bytes` of fresh point notes (each call a new change). */
function bigUpdate(bytes: number): Uint8Array {
	const doc = new Y.Doc();
	addNotes(doc, bytes);
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, MESSAGE_SYNC);
	syncProtocol.writeUpdate(e, Y.encodeStateAsUpdate(doc));
	return encoding.toUint8Array(e);
}

function send(socket: Socket, message: Uint8Array): Promise<MessageAck> {
	return socket.timeout(10_000).emitWithAck(EVENT_MESSAGE, message) as Promise<MessageAck>;
}

async function storedBytes(boardId: string) {
	const r = await sql<{ n: string; bytes: string | null }>`
		select count(*)::text as n, sum(length(update))::text as bytes from board_update where board_id = ${boardId}`.execute(t.db);
	return { rows: Number(r.rows[0].n), bytes: Number(r.rows[0].bytes ?? 0) };
}

function provider(boardId: string, cookie: string) {
	const p = openProvider(app.url, boardId, cookie);
	providers.push(p);
	return p;
}

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url, env: { ...LIMITS, COLLAB_COMPACT_EVERY: '100000' } });
	f = await createBoardFixture(t.db, { boards: 7 });
	tech = await sessionCookie(app.url, f.people.technician);
	engineer = await sessionCookie(app.url, f.people.engineer);
});
afterAll(async () => {
	for (const s of sockets) s.disconnect();
	await Promise.all(providers.map((p) => p.destroy()));
	await app?.stop();
	await t?.drop();
});

describe('limits on what a board takes', () => {
	it('refuses an update over the largest update size with the reason, and stores nothing of it', async () => {
		const boardId = f.boardIds[0];
		const socket = await joinedSocket(boardId);
		const ack = await send(socket, bigUpdate(150 * 1024));
		expect(ack.ok).toBe(false);
		expect('refused' in ack && ack.refused).toMatch(/too large to save \(\d+ KB; the limit is 100 KB\)/);
		expect((await storedBytes(boardId)).rows).toBe(0);
		// The socket stays usable: a normal update is stored.
		expect(await send(socket, bigUpdate(2 * 1024))).toEqual({ ok: true });
		expect((await storedBytes(boardId)).rows).toBe(1);

		// Through the provider: the person is told why, the board goes on from the server's state.
		const p = provider(boardId, engineer);
		await p.whenSynced();
		const refused = next(p, 'refused');
		addNotes(p.doc, 150 * 1024);
		const [reason] = await refused;
		expect(reason).toMatch(/too large to save/);
		expect((await storedBytes(boardId)).rows).toBe(1);
	});

	it('slows a flood from one connection to its byte budget: the rest is answered "not now" with a wait', async () => {
		const boardId = f.boardIds[6];
		const socket = await joinedSocket(boardId);
		const started = Date.now();
		const acks: MessageAck[] = [];
		// 10 updates of 25 KB, each sent as soon as the last was answered, waits ignored (250 KB).
		for (let i = 0; i < 10; i++) acks.push(await send(socket, bigUpdate(25 * 1024)));
		const seconds = (Date.now() - started) / 1000;
		const accepted = acks.filter((a) => a.ok).length;
		const slowed = acks.filter((a): a is Extract<MessageAck, { retry: string }> => 'retry' in a);
		expect(accepted + slowed.length).toBe(10);
		expect(slowed.length).toBeGreaterThan(0);
		expect(slowed[0].retry).toMatch(/faster than the server takes them/);
		expect(slowed[0].retryAfterMs).toBeGreaterThan(0);
		// Stored: the burst plus the rate over the time taken, plus the one update that may go into debt.
		const stored = await storedBytes(boardId);
		expect(stored.rows).toBe(accepted);
		expect(stored.bytes).toBeLessThanOrEqual(100 * 1024 + 40 * 1024 * seconds + 27 * 1024);
		// After waiting as told, the connection is let through again.
		await new Promise((r) => setTimeout(r, Math.max(...slowed.slice(-1).map((s) => s.retryAfterMs))));
		expect(await send(socket, bigUpdate(1024))).toEqual({ ok: true });
	});

	it('does not read a connection over its budget until its wait is over: a sender that does not wait is held at the network', async () => {
		const socket = await joinedSocket(f.boardIds[5]);
		const other = await joinedSocket(f.boardIds[3]);
		// 30 KB every 30 ms for 2 s without waiting for answers: 2 MB against a 100 KB burst at 40 KB/s.
		let answered = 0;
		let sent = 0;
		const started = Date.now();
		while (Date.now() - started < 2000) {
			socket.emit(EVENT_MESSAGE, bigUpdate(30 * 1024), () => answered++);
			sent++;
			await new Promise((r) => setTimeout(r, 30));
		}
		await new Promise((r) => setTimeout(r, 300));
		// Read as it came, every message would have been answered by now (taken or "not now").
		// Held, the server read only about what the budget allows; the rest waits at the network.
		expect(sent).toBeGreaterThan(40);
		expect(answered).toBeGreaterThan(5); // the burst went through
		expect(answered).toBeLessThan(sent / 2);
		const seconds = (Date.now() - started) / 1000;
		const stored = await storedBytes(f.boardIds[5]);
		expect(stored.bytes).toBeLessThanOrEqual(100 * 1024 + 40 * 1024 * seconds + 32 * 1024);
		// The same person's other connection is not held.
		const t0 = Date.now();
		expect(await send(other, bigUpdate(1024))).toEqual({ ok: true });
		expect(Date.now() - t0).toBeLessThan(2000);
		// The held connection is read again as its budget refills; it stays open.
		const before = answered;
		await waitFor(() => answered > before, 'the held connection is read again');
		expect(socket.connected).toBe(true);
	});

	it('a person over the budget keeps every change: they are held back, merged and sent again until stored', async () => {
		const boardId = f.boardIds[2];
		const p = provider(boardId, tech);
		const watcher = provider(boardId, engineer);
		await Promise.all([p.whenSynced(), watcher.whenSynced()]);
		const delayed: Array<string | null> = [];
		const refused: string[] = [];
		p.on('delayed', (r: string | null) => delayed.push(r));
		p.on('refused', (r: string) => refused.push(r));
		// 12 changes of 20 KB each at once: 240 KB against a 100 KB burst at 40 KB/s.
		const ids: string[] = [];
		for (let i = 0; i < 12; i++) ids.push(...addNotes(p.doc, 20 * 1024, `C${i}-`));
		// (The server reads the held-back connection again once its wait is over, so the time
		// the provider says so may be short: the event is what counts.)
		await waitFor(() => delayed.length > 0, 'the provider says its changes are held back');
		await waitFor(() => p.unsynced === 0, 'every change stored in the end', 30_000);
		expect(p.delayed).toBeNull();
		expect(delayed[0]).toMatch(/kept on this device/);
		await waitFor(() => isDeepStrictEqual(content(watcher.doc), content(p.doc)), 'the other person sees all of it');
		const notes = (d: Y.Doc) =>
			readBoard(d)
				.points.map((x) => x.notes)
				.join('').length;
		const written = notes(p.doc);
		expect(written).toBeGreaterThan(12 * 15 * 1024);
		await waitFor(() => notes(watcher.doc) === written, 'and every byte of it');
		const doc = await storedDoc(t.db, boardId);
		expect(
			readBoard(doc)
				.points.map((x) => x.id)
				.sort()
		).toEqual([...ids].sort());
		expect(notes(doc)).toBe(written);
		expect(refused).toEqual([]); // nothing was rolled back
	});

	it('refuses growth beyond the largest document, and what is stored stays under it', async () => {
		const boardId = f.boardIds[3];
		// Four connections, each within its own budget, 90 KB each: the fourth would pass 300 KB.
		const acks: MessageAck[] = [];
		for (let i = 0; i < 4; i++) acks.push(await send(await joinedSocket(boardId), bigUpdate(90 * 1024)));
		expect(acks.slice(0, 3)).toEqual([{ ok: true }, { ok: true }, { ok: true }]);
		expect(acks[3].ok).toBe(false);
		expect('refused' in acks[3] && acks[3].refused).toMatch(/reached its size limit \(300 KB\)/);
		const stored = await storedDoc(t.db, boardId);
		expect(Y.encodeStateAsUpdate(stored).byteLength).toBeLessThanOrEqual(300 * 1024);
		// Small edits that fit still go in.
		expect(await send(sockets.at(-1)!, bigUpdate(1024))).toEqual({ ok: true });
	});

	it('closes a connection that keeps asking for the whole board (each answer costs an encoding of it)', async () => {
		const socket = await joinedSocket(f.boardIds[3]);
		let reason = '';
		socket.on('board:closed', (e: { reason: string }) => (reason = e.reason));
		const step1 = encoding.createEncoder();
		encoding.writeVarUint(step1, MESSAGE_SYNC);
		syncProtocol.writeSyncStep1(step1, new Y.Doc());
		const message = encoding.toUint8Array(step1);
		for (let i = 0; i < 30 && socket.connected; i++) socket.emit(EVENT_MESSAGE, message, () => {});
		await waitFor(() => !socket.connected, 'the socket closed');
		expect(reason).toMatch(/sync requests per second/);
	});

	it('a flood on one board leaves people on another board working normally', async () => {
		const boardId = f.boardIds[4];
		const a = provider(boardId, engineer);
		const b = provider(boardId, tech);
		await Promise.all([a.whenSynced(), b.whenSynced()]);
		// The flood: two connections on board 1, firing without waiting for answers.
		const flooders = [await joinedSocket(f.boardIds[1]), await joinedSocket(f.boardIds[1])];
		let flooding = true;
		const floodAcks: MessageAck[] = [];
		let floodSent = 0;
		const flood = (async () => {
			while (flooding) {
				for (const s of flooders) {
					s.emit(EVENT_MESSAGE, bigUpdate(60 * 1024), (a: MessageAck) => floodAcks.push(a));
					floodSent++;
				}
				await new Promise((r) => setTimeout(r, 40));
			}
		})();
		try {
			// Past the flooders' bursts: from here on they are held to their budgets.
			await waitFor(() => floodAcks.some((a) => 'retry' in a), 'the flood is being slowed');
			for (let i = 0; i < 10; i++) {
				const id = addPoint(i % 2 ? a.doc : b.doc, { x: 5 * i, y: 7 * i, label: `Q${i}` });
				await waitFor(() => (i % 2 ? b.doc : a.doc).getMap('points').has(id), `edit ${i} seen by the other person`);
			}
			await waitFor(() => a.unsynced === 0 && b.unsynced === 0, 'all acknowledged');
			expect(a.delayed).toBeNull();
			expect(b.delayed).toBeNull();
		} finally {
			flooding = false;
		}
		await flood;
		expect(floodAcks.filter((a) => 'retry' in a).length).toBeGreaterThan(0);
		// Held at the network: far fewer of the flood's messages were even read than were sent.
		expect(floodAcks.length).toBeLessThan(floodSent / 2);
		expect(readBoard(await storedDoc(t.db, boardId)).points).toHaveLength(10);
	});
});
