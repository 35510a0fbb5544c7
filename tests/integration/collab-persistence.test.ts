// Storage of the live board: acknowledged edits survive a hard server restart, compaction keeps
// the document state of the raw log, runs after a number of updates and on unload, and never
// loses an update appended while it runs.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { content, createBoardFixture, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, deletePoint, maps, movePoint, updatePoint } from '../../src/lib/board/model';
import { compact } from '../../src/lib/server/collab/persistence';
import type { BoardProvider } from '../../src/lib/board/sync/provider';

let t: TestDatabase;
let f: BoardFixture;
const apps: RunningApp[] = [];
const open: BoardProvider[] = [];

async function app(env: Record<string, string> = {}) {
	const a = await startApp({ databaseUrl: t.url, env });
	apps.push(a);
	return a;
}
function provider(url: string, boardId: string, cookie: string) {
	const p = openProvider(url, boardId, cookie);
	open.push(p);
	return p;
}
function logRows(boardId: string) {
	return t.db.selectFrom('board_update').select(['seq']).where('board_id', '=', boardId).execute();
}
function sameState(a: Y.Doc, b: Y.Doc) {
	expect(content(a)).toEqual(content(b));
	expect(Y.decodeStateVector(Y.encodeStateVector(a))).toEqual(Y.decodeStateVector(Y.encodeStateVector(b)));
	// Same deletions too: a deleted item in one must be deleted in the other.
	expect(Y.equalDeleteSets(Y.createDeleteSetFromStructStore(a.store), Y.createDeleteSetFromStructStore(b.store))).toBe(true);
}

/** A run of edits of every kind: adds, moves, field edits and deletions. */
function edit(doc: Y.Doc, n: number, tag: string) {
	const ids: string[] = [];
	for (let i = 0; i < n; i++) {
		ids.push(addPoint(doc, { x: 10 * i, y: 5 * i, label: `${tag}${i}` }));
		if (i % 3 === 1) movePoint(doc, ids[i - 1], 1 + i, 2 + i);
		if (i % 4 === 2) updatePoint(doc, ids[i], { notes: `checked ${i}` });
		if (i % 5 === 4) deletePoint(doc, ids[i - 2]);
	}
}

beforeAll(async () => {
	t = await createTestDatabase();
	f = await createBoardFixture(t.db, { boards: 4 });
});
afterAll(async () => {
	await Promise.all(open.map((p) => p.destroy()));
	await Promise.all(apps.map((a) => a.stop()));
	await t?.drop();
});

describe('restart', () => {
	it('keeps every edit acknowledged before the server was killed', async () => {
		const first = await app({ COLLAB_COMPACT_EVERY: '1000' });
		const cookie = await sessionCookie(first.url, f.people.technician);
		const p = provider(first.url, f.boardIds[0], cookie);
		await p.whenSynced();
		edit(p.doc, 25, 'R');
		await waitFor(() => p.unsynced === 0, 'all acknowledged');
		const acknowledged = content(p.doc);
		await p.destroy();

		// No graceful shutdown, no compaction on the way out.
		const exited = new Promise((r) => first.process.once('exit', r));
		first.process.kill('SIGKILL');
		await exited;
		apps.splice(apps.indexOf(first), 1);

		const second = await app();
		const q = provider(second.url, f.boardIds[0], await sessionCookie(second.url, f.people.engineer));
		await q.whenSynced();
		expect(content(q.doc)).toEqual(acknowledged);
		expect(Object.keys(acknowledged.points as object).length).toBe(20); // 25 added, 5 deleted
	});
});

describe('restart under an open board', () => {
	it('a connected client rides out the restart: its edits from before and during the outage are kept', async () => {
		const first = await app({});
		const port = first.port;
		const p = provider(first.url, f.boardIds[0], await sessionCookie(first.url, f.people.engineer));
		await p.whenSynced();
		const before = addPoint(p.doc, { x: 1, y: 1, label: 'before' });
		await waitFor(() => p.unsynced === 0, 'acknowledged');

		const exited = new Promise((r) => first.process.once('exit', r));
		first.process.kill('SIGKILL');
		await exited;
		apps.splice(apps.indexOf(first), 1);
		await waitFor(() => p.status !== 'connected', 'the client notices');
		const during = addPoint(p.doc, { x: 2, y: 2, label: 'during' });
		expect(p.unsynced).toBe(1);

		// Same address: the provider reconnects by itself.
		const second = await startApp({ databaseUrl: t.url, port });
		apps.push(second);
		await waitFor(() => p.status === 'connected' && p.synced && p.unsynced === 0, 'reconnected and synced', 20_000);
		const q = provider(second.url, f.boardIds[0], await sessionCookie(second.url, f.people.viewer));
		await q.whenSynced();
		expect(maps(q.doc).points.has(before)).toBe(true);
		expect(maps(q.doc).points.has(during)).toBe(true);
	});
});

describe('compaction', () => {
	let server: RunningApp;
	let cookie: string;
	beforeAll(async () => {
		server = await app({ COLLAB_COMPACT_EVERY: '1000000' });
		cookie = await sessionCookie(server.url, f.people.engineer);
	});

	it('leaves the same document state as the raw log', async () => {
		const boardId = f.boardIds[1];
		const a = provider(server.url, boardId, cookie);
		const b = provider(server.url, boardId, await sessionCookie(server.url, f.people.technician));
		await Promise.all([a.whenSynced(), b.whenSynced()]);
		edit(a.doc, 30, 'A');
		edit(b.doc, 30, 'B');
		await waitFor(() => a.unsynced === 0 && b.unsynced === 0, 'acknowledged');

		const raw = await storedDoc(t.db, boardId, { logOnly: true });
		const rows = await logRows(boardId);
		expect(rows.length).toBeGreaterThan(60);

		const r = await compact(t.db, boardId);
		expect(r!.merged).toBe(rows.length);
		expect(await logRows(boardId)).toHaveLength(0);
		const board = await t.db.selectFrom('board').select(['snapshot', 'snapshot_seq']).where('id', '=', boardId).executeTakeFirstOrThrow();
		expect(board.snapshot_seq).toBe(
			rows
				.map((x) => BigInt(x.seq))
				.reduce((m, x) => (x > m ? x : m))
				.toString()
		);

		const compacted = new Y.Doc();
		Y.applyUpdate(compacted, board.snapshot!);
		sameState(compacted, raw);
		sameState(compacted, a.doc);

		// A second round over snapshot + new log rows gives the same state as applying both.
		edit(a.doc, 7, 'C');
		await waitFor(() => a.unsynced === 0, 'acknowledged');
		const before = await storedDoc(t.db, boardId);
		await compact(t.db, boardId);
		sameState(await storedDoc(t.db, boardId), before);
		sameState(await storedDoc(t.db, boardId), a.doc);
	});

	it('loses nothing appended while compaction runs', async () => {
		const boardId = f.boardIds[2];
		const a = provider(server.url, boardId, cookie);
		await a.whenSynced();
		let running = true;
		let rounds = 0;
		const compactor = (async () => {
			while (running) {
				await compact(t.db, boardId);
				rounds++;
			}
		})();
		for (let i = 0; i < 120; i++) {
			addPoint(a.doc, { x: i, y: i, label: `K${i}` });
			if (i % 10 === 0) await new Promise((r) => setTimeout(r, 5));
		}
		await waitFor(() => a.unsynced === 0, 'acknowledged');
		running = false;
		await compactor;
		expect(rounds).toBeGreaterThan(1);
		sameState(await storedDoc(t.db, boardId), a.doc);
		expect(maps(a.doc).points.size).toBe(120);
	});
});

describe('automatic compaction and unloading', () => {
	it('compacts after a number of updates, and compacts and unloads an idle board', async () => {
		const server = await app({ COLLAB_COMPACT_EVERY: '5', COLLAB_UNLOAD_GRACE_MS: '300' });
		const boardId = f.boardIds[3];
		const a = provider(server.url, boardId, await sessionCookie(server.url, f.people.technician));
		await a.whenSynced();
		for (let i = 0; i < 12; i++) addPoint(a.doc, { x: i, y: 1, label: `U${i}` });
		await waitFor(() => a.unsynced === 0, 'acknowledged');
		await waitFor(async () => {
			const b = await t.db.selectFrom('board').select('snapshot').where('id', '=', boardId).executeTakeFirstOrThrow();
			return b.snapshot !== null && (await logRows(boardId)).length < 12;
		}, 'a snapshot after 5 updates');
		const expected = content(a.doc);

		await a.destroy();
		await waitFor(() => server.output().includes(`unloaded board ${boardId}`), 'the board unloaded');
		expect(await logRows(boardId)).toHaveLength(0);

		// Loading again from the snapshot gives the same board.
		const b = provider(server.url, boardId, await sessionCookie(server.url, f.people.viewer));
		await b.whenSynced();
		expect(content(b.doc)).toEqual(expected);
		// Loaded a second time (from the snapshot alone), so it really was dropped from memory.
		expect(server.output().match(new RegExp(`loaded board ${boardId}: 0 log row`, 'g'))).toHaveLength(2);
	});
});
