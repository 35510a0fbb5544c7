// Bad input on the live board: random bytes, truncated y-protocols messages, oversized messages
// and floods close the offending socket with a logged reason; the server, the document and the
// other people on the board carry on.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import * as fc from 'fast-check';
import * as encoding from 'lib0/encoding';
import { io as connect, type Socket } from 'socket.io-client';
import { encodeAwarenessUpdate, Awareness } from 'y-protocols/awareness';
import * as syncProtocol from 'y-protocols/sync';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { content, createBoardFixture, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, maps, updatePoint } from '../../src/lib/board/model';
import {
	EVENT_CLOSED,
	EVENT_JOIN,
	EVENT_MESSAGE,
	MESSAGE_AWARENESS,
	MESSAGE_SYNC,
	type JoinReply
} from '../../src/lib/board/sync/protocol';
import type { BoardProvider } from '../../src/lib/board/sync/provider';

const MAX_BYTES = 64 * 1024;
let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
let cookie: string;
let witness: BoardProvider;
const statuses: string[] = [];

async function joinedSocket(boardId: string): Promise<Socket> {
	const socket = connect(app.url, { transports: ['websocket'], extraHeaders: { cookie }, forceNew: true, reconnection: false });
	await new Promise<void>((resolve, reject) => {
		socket.once('connect', () => resolve());
		socket.once('connect_error', reject);
	});
	const reply = (await socket.emitWithAck(EVENT_JOIN, { boardId })) as JoinReply;
	if (!reply.ok) throw new Error(reply.error);
	return socket;
}

/** Sends one message; resolves with the reason if the server closed the socket, else null. */
async function send(socket: Socket, message: Uint8Array): Promise<string | null> {
	let reason: string | null = null;
	socket.on(EVENT_CLOSED, (e: { reason: string }) => (reason = e.reason));
	const closed = new Promise<void>((r) => socket.once('disconnect', () => r()));
	socket.emit(EVENT_MESSAGE, message);
	// A harmless sync step 1 after it: acknowledged if the socket survived.
	const probe = encoding.createEncoder();
	encoding.writeVarUint(probe, MESSAGE_SYNC);
	syncProtocol.writeSyncStep1(probe, new Y.Doc());
	const alive = socket
		.timeout(3000)
		.emitWithAck(EVENT_MESSAGE, encoding.toUint8Array(probe))
		.then(() => true)
		.catch(() => false);
	const survived = await Promise.race([alive, closed.then(() => false)]);
	if (!survived) await closed;
	return survived ? null : (reason ?? 'closed without a reason');
}

function frame(type: number, payload: Uint8Array) {
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, type);
	encoding.writeVarUint8Array(e, payload);
	return encoding.toUint8Array(e);
}

/** Real messages of every kind, to be cut short. */
function realMessages(): Uint8Array[] {
	const doc = new Y.Doc();
	const id = addPoint(doc, { x: 1, y: 2, label: 'P1', notes: 'a longer note so the update has some body' });
	updatePoint(doc, id, { wallThicknessMm: 8 });
	const step1 = encoding.createEncoder();
	encoding.writeVarUint(step1, MESSAGE_SYNC);
	syncProtocol.writeSyncStep1(step1, doc);
	const step2 = encoding.createEncoder();
	encoding.writeVarUint(step2, MESSAGE_SYNC);
	syncProtocol.writeSyncStep2(step2, doc);
	const update = encoding.createEncoder();
	encoding.writeVarUint(update, MESSAGE_SYNC);
	syncProtocol.writeUpdate(update, Y.encodeStateAsUpdate(doc));
	const awareness = new Awareness(doc);
	awareness.setLocalState({ user: { name: 'x', color: '#000' }, cursor: { x: 1, y: 2 }, selection: [id] });
	const aw = frame(MESSAGE_AWARENESS, encodeAwarenessUpdate(awareness, [awareness.clientID]));
	awareness.destroy();
	return [step1, step2, update, aw].map((e) => (e instanceof Uint8Array ? e : encoding.toUint8Array(e)));
}

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({
		databaseUrl: t.url,
		env: { COLLAB_MAX_MESSAGE_BYTES: String(MAX_BYTES), COLLAB_MESSAGES_PER_SECOND: '50', COLLAB_MESSAGE_BURST: '100' }
	});
	f = await createBoardFixture(t.db);
	cookie = await sessionCookie(app.url, f.people.technician);
	witness = openProvider(app.url, f.boardIds[0], await sessionCookie(app.url, f.people.engineer));
	await witness.whenSynced();
	witness.on('status', (s: string) => statuses.push(s));
	addPoint(witness.doc, { x: 10, y: 10, label: 'P1' });
	await waitFor(() => witness.unsynced === 0, 'witness stored');
});
afterAll(async () => {
	await witness?.destroy();
	await app?.stop();
	await t?.drop();
});

async function stillFine() {
	expect(app.process.exitCode).toBeNull();
	expect(app.process.signalCode).toBeNull();
	// The other member on the board never lost the connection and can still edit.
	expect(statuses).toEqual([]);
	expect(witness.status).toBe('connected');
	const id = addPoint(witness.doc, { x: 1, y: 1, label: `W${Date.now()}` });
	await waitFor(() => witness.unsynced === 0, 'witness edit stored');
	expect(maps(await storedDoc(t.db, f.boardIds[0])).points.has(id)).toBe(true);
	// Nothing unreadable went into storage: what is stored is what the witness has.
	expect(content(await storedDoc(t.db, f.boardIds[0]))).toEqual(content(witness.doc));
}

describe('bad input', () => {
	it('every truncated y-protocols message closes that socket as malformed', async () => {
		let socket = await joinedSocket(f.boardIds[0]);
		let cases = 0;
		for (const message of realMessages()) {
			for (let len = 1; len < message.length; len++) {
				const reason = await send(socket, message.slice(0, len));
				expect(reason, `cut at ${len} of ${message.length}`).toMatch(/malformed/);
				cases++;
				socket = await joinedSocket(f.boardIds[0]);
			}
		}
		socket.close();
		expect(cases).toBeGreaterThan(100);
		await waitFor(() => /closing socket .* malformed message/.test(app.output()), 'the reason in the log');
		await stillFine();
	});

	it('random bytes never crash the server nor reach the document', async () => {
		let socket = await joinedSocket(f.boardIds[0]);
		const samples = fc.sample(
			fc.oneof(
				fc.uint8Array({ minLength: 1, maxLength: 64 }),
				fc.uint8Array({ minLength: 1, maxLength: 2048 }),
				// Well-framed sync updates with random bodies, and random awareness bodies.
				fc.uint8Array({ minLength: 0, maxLength: 256 }).map((b) => {
					const e = encoding.createEncoder();
					encoding.writeVarUint(e, MESSAGE_SYNC);
					syncProtocol.writeUpdate(e, b);
					return encoding.toUint8Array(e);
				}),
				fc.uint8Array({ minLength: 0, maxLength: 256 }).map((b) => frame(MESSAGE_AWARENESS, b))
			),
			{ numRuns: 250, seed: 20261201 }
		);
		let closedCount = 0;
		for (const bytes of samples) {
			const reason = await send(socket, bytes);
			if (reason) {
				closedCount++;
				socket = await joinedSocket(f.boardIds[0]);
			}
		}
		socket.close();
		expect(closedCount).toBeGreaterThan(200);
		await stillFine();
	});

	it('an oversized message closes the socket with the reason logged', async () => {
		const socket = await joinedSocket(f.boardIds[0]);
		const doc = new Y.Doc();
		doc.getMap('points').set('big', 'x'.repeat(MAX_BYTES + 10));
		const e = encoding.createEncoder();
		encoding.writeVarUint(e, MESSAGE_SYNC);
		syncProtocol.writeUpdate(e, Y.encodeStateAsUpdate(doc));
		const reason = await send(socket, encoding.toUint8Array(e));
		expect(reason).toMatch(/larger than 65536 bytes/);
		await waitFor(() => /closing socket .*larger than 65536 bytes/.test(app.output()), 'the reason in the log');
		expect(maps(await storedDoc(t.db, f.boardIds[0])).points.has('big')).toBe(false);
		await stillFine();
	});

	it('a flood of messages closes that socket for the rate limit', async () => {
		const socket = await joinedSocket(f.boardIds[0]);
		const reasons: string[] = [];
		socket.on(EVENT_CLOSED, (ev: { reason: string }) => reasons.push(ev.reason));
		const closed = new Promise<void>((r) => socket.once('disconnect', () => r()));
		const doc = new Y.Doc();
		const aw = new Awareness(doc);
		for (let i = 0; i < 300; i++) {
			aw.setLocalState({ cursor: { x: i, y: i } });
			socket.emit(EVENT_MESSAGE, frame(MESSAGE_AWARENESS, encodeAwarenessUpdate(aw, [aw.clientID])));
		}
		await closed;
		aw.destroy();
		expect(reasons[0]).toMatch(/more than 50 messages per second/);
		await waitFor(() => /closing socket .*more than 50 messages per second/.test(app.output()), 'the reason in the log');
		await stillFine();
	});

	it('someone else’s presence cannot be forged', async () => {
		const socket = await joinedSocket(f.boardIds[0]);
		const forged = new Awareness(new Y.Doc());
		forged.clientID = witness.awareness.clientID;
		forged.setLocalState({ user: { name: 'Not me' }, cursor: { x: 999, y: 999 } });
		const reason = await send(socket, frame(MESSAGE_AWARENESS, encodeAwarenessUpdate(forged, [forged.clientID])));
		forged.destroy();
		expect(reason).toMatch(/another member/);
		await stillFine();
	});
});
