// The pure pieces of the live board server: the rate limiter, the configuration reader, the
// update checks, the group-commit writer (with a stand-in store) and the byte budgets.
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { TokenBucket } from '../../../src/lib/server/collab/rate-limit';
import { collabOptionsFromEnv, DEFAULT_COLLAB_OPTIONS } from '../../../src/lib/server/collab/config';
import { buildsOnMissing, decodeUpdateStrict, isCoveredBy, isEmptyUpdate } from '../../../src/lib/server/collab/update-check';
import { StorageUnavailable, UpdateWriter } from '../../../src/lib/server/collab/writer';
import { ByteBucket, DocumentSize, spend } from '../../../src/lib/server/collab/budget';
import type { PendingUpdate } from '../../../src/lib/server/collab/persistence';

describe('TokenBucket', () => {
	it('allows a burst, then the sustained rate', () => {
		let t = 0;
		const b = new TokenBucket(10, 5, () => t);
		for (let i = 0; i < 5; i++) expect(b.take()).toBe(true);
		expect(b.take()).toBe(false);
		t += 100; // 0.1 s at 10/s: one more token
		expect(b.take()).toBe(true);
		expect(b.take()).toBe(false);
		t += 10_000; // refills to the burst, not beyond
		for (let i = 0; i < 5; i++) expect(b.take()).toBe(true);
		expect(b.take()).toBe(false);
	});
});

describe('collabOptionsFromEnv', () => {
	it('uses the defaults when nothing is set', () => {
		expect(collabOptionsFromEnv({})).toEqual(DEFAULT_COLLAB_OPTIONS);
	});
	it('reads the variables', () => {
		const o = collabOptionsFromEnv({ COLLAB_MAX_MESSAGE_BYTES: '65536', COLLAB_UNLOAD_GRACE_MS: '0', COLLAB_CLUSTER: 'off' });
		expect(o.maxMessageBytes).toBe(65536);
		expect(o.unloadGraceMs).toBe(0);
		expect(o.cluster).toBe(false);
	});
	it('refuses nonsense with the variable named', () => {
		expect(() => collabOptionsFromEnv({ COLLAB_COMPACT_EVERY: '0' })).toThrow(/COLLAB_COMPACT_EVERY must be a whole number ≥ 1/);
		expect(() => collabOptionsFromEnv({ COLLAB_MESSAGES_PER_SECOND: 'fast' })).toThrow(/COLLAB_MESSAGES_PER_SECOND/);
	});
});

describe('update checks', () => {
	it('tells empty, new and already-known updates apart', () => {
		const server = new Y.Doc();
		const client = new Y.Doc();
		const p = client.getMap('points');
		p.set('a', 1);
		p.set('b', 2);
		const sv = Y.encodeStateVector(server);
		const firstSync = Y.encodeStateAsUpdate(client, sv);
		expect(isEmptyUpdate(decodeUpdateStrict(Y.encodeStateAsUpdate(new Y.Doc())))).toBe(true);
		expect(isCoveredBy(server, decodeUpdateStrict(firstSync))).toBe(false);
		Y.applyUpdate(server, firstSync);
		expect(isCoveredBy(server, decodeUpdateStrict(firstSync))).toBe(true);

		// A deletion the server has not seen is news, even though every struct is known.
		p.delete('a');
		const withDeletion = Y.encodeStateAsUpdate(client, Y.encodeStateVector(server));
		const decoded = decodeUpdateStrict(withDeletion);
		expect(decoded.structs).toHaveLength(0);
		expect(isCoveredBy(server, decoded)).toBe(false);
		Y.applyUpdate(server, withDeletion);
		// The whole delete set again, as a reconnecting client sends it: nothing new.
		expect(isCoveredBy(server, decodeUpdateStrict(Y.encodeStateAsUpdate(client, Y.encodeStateVector(server))))).toBe(true);
	});

	it('throws on truncated updates', () => {
		const d = new Y.Doc();
		d.getMap('points').set('a', 'some text');
		const u = Y.encodeStateAsUpdate(d);
		for (let n = 1; n < u.length; n++) expect(() => decodeUpdateStrict(u.slice(0, n)), `cut at ${n}`).toThrow();
	});
});

describe('UpdateWriter', () => {
	const item = (n: number): PendingUpdate => ({
		boardId: 'b',
		organisationId: 'o',
		userId: 'u',
		sessionId: 's',
		update: new Uint8Array([n])
	});

	it('batches what arrives while a write is in flight, and answers each once stored', async () => {
		const calls: number[][] = [];
		let release!: () => void;
		let first = true;
		const writer = new UpdateWriter({ query: async () => ({}) as never }, 500, async (_db, items) => {
			calls.push(items.map((i) => i.update[0]));
			if (first) {
				first = false;
				await new Promise<void>((r) => (release = r));
			}
			return items.map((i) => (i.update[0] === 3 ? null : `seq${i.update[0]}`));
		});
		const answered: string[] = [];
		const p1 = writer.enqueue(item(1)).then((s) => answered.push(`1:${s}`));
		const p2 = writer.enqueue(item(2)).then((s) => answered.push(`2:${s}`));
		const p3 = writer.enqueue(item(3)).then((s) => answered.push(`3:${s}`));
		await new Promise((r) => setTimeout(r, 10));
		expect(answered).toEqual([]); // nothing is answered before it is stored
		release();
		await Promise.all([p1, p2, p3]);
		expect(calls).toEqual([[1], [2, 3]]);
		expect(answered).toEqual(['1:seq1', '2:seq2', '3:null']);
	});

	it('keeps a batch in memory and retries while the store fails', async () => {
		let attempts = 0;
		const writer = new UpdateWriter({ query: async () => ({}) as never }, 500, async (_db, items) => {
			attempts++;
			if (attempts < 3) throw new Error('connection refused');
			return items.map(() => 'seq9');
		});
		const errors = console.error;
		console.error = () => {};
		try {
			await expect(writer.enqueue(item(9))).resolves.toBe('seq9');
		} finally {
			console.error = errors;
		}
		expect(attempts).toBe(3);
		expect(writer.stats.failures).toBe(2);
	});
});

describe('UpdateWriter when the database stays away', () => {
	const item = (n: number, boardId = 'b'): PendingUpdate => ({
		boardId,
		organisationId: 'o',
		userId: 'u',
		sessionId: 's',
		update: new Uint8Array([n])
	});
	const quiet = async (run: () => Promise<void>) => {
		const errors = console.error;
		console.error = () => {};
		try {
			await run();
		} finally {
			console.error = errors;
		}
	};

	it('gives up after its tries (StorageUnavailable, reports down), keeps the update and stores it once the database is back', async () => {
		let failing = true;
		let attempts = 0;
		const reports: string[] = [];
		const stored: number[] = [];
		const writer = new UpdateWriter(
			{ query: async () => ({}) as never },
			500,
			async (_db, items) => {
				attempts++;
				if (failing) throw new Error('connect ECONNREFUSED');
				stored.push(...items.map((i) => i.update[0]));
				return items.map((i) => `seq${i.update[0]}`);
			},
			{ attempts: 2, baseDelayMs: 1, maxDelayMs: 5 },
			(_part, status) => reports.push(status)
		);
		await quiet(async () => {
			await expect(writer.enqueue(item(1))).rejects.toBeInstanceOf(StorageUnavailable);
			expect(attempts).toBe(2);
			expect(writer.down).toBe(true);
			expect(reports).toEqual(['down']);
			// Meanwhile the board takes nothing new, and "is everything stored?" is answered no.
			expect(writer.accepting('b')).toBe(false);
			expect(writer.accepting('other')).toBe(true);
			await expect(writer.stored('b')).rejects.toBeInstanceOf(StorageUnavailable);
			// It keeps trying by itself and stores the kept update when the database is back.
			await new Promise((r) => setTimeout(r, 30));
			expect(attempts).toBeGreaterThan(2);
			failing = false;
			for (let i = 0; i < 200 && writer.down; i++) await new Promise((r) => setTimeout(r, 5));
			expect(writer.down).toBe(false);
			expect(reports.at(-1)).toBe('up');
			expect(stored).toEqual([1]);
			expect(writer.accepting('b')).toBe(true);
			await expect(writer.enqueue(item(2))).resolves.toBe('seq2');
		});
		await writer.close();
	});

	it('one board whose write fails does not hold up the others', async () => {
		const calls: string[][] = [];
		const writer = new UpdateWriter(
			{ query: async () => ({}) as never },
			500,
			async (_db, items) => {
				calls.push(items.map((i) => `${i.boardId}${i.update[0]}`));
				if (items.some((i) => i.boardId === 'bad')) throw new Error('lock timeout');
				return items.map((i) => `${i.boardId}${i.update[0]}`);
			},
			{ attempts: 3, baseDelayMs: 50, maxDelayMs: 50 },
			() => {}
		);
		await quiet(async () => {
			const bad = writer.enqueue(item(1, 'bad')).catch((e) => e);
			const good = [writer.enqueue(item(1, 'x')), writer.enqueue(item(1, 'y'))];
			const started = performance.now();
			await expect(Promise.all(good)).resolves.toEqual(['x1', 'y1']);
			// The first batch held all three; after it failed, the good boards went on at once
			// (within the first back-off) and the bad one alone.
			expect(performance.now() - started).toBeLessThan(200);
			const later = await writer.enqueue(item(2, 'x'));
			expect(later).toBe('x2');
			expect(await bad).toBeInstanceOf(StorageUnavailable);
			expect(calls.filter((c) => c.includes('bad1') && c.length > 1).length).toBeLessThanOrEqual(1);
		});
		await writer.close();
	});

	it('answers "stored" for a board only once what it took before is stored, in order', async () => {
		let release!: () => void;
		const gate = new Promise<void>((r) => (release = r));
		const writer = new UpdateWriter({ query: async () => ({}) as never }, 500, async (_db, items) => {
			await gate;
			return items.map((i) => `seq${i.update[0]}`);
		});
		const events: string[] = [];
		await writer.stored('b').then(() => events.push('empty board: at once'));
		const first = writer.enqueue(item(1)).then(() => events.push('1 stored'));
		const barrier = writer.stored('b').then(() => events.push('barrier'));
		await new Promise((r) => setTimeout(r, 10));
		expect(events).toEqual(['empty board: at once']);
		release();
		await Promise.all([first, barrier]);
		expect(events).toEqual(['empty board: at once', '1 stored', 'barrier']);
		await writer.close();
	});
});

describe('UpdateWriter commit pacing', () => {
	const item = (n: number, boardId = 'b'): PendingUpdate => ({
		boardId,
		organisationId: 'o',
		userId: 'u',
		sessionId: 's',
		update: new Uint8Array([n])
	});
	it('starts a commit at once on a quiet board, and under load puts what arrives within the interval in one commit', async () => {
		const batches: number[][] = [];
		const starts: number[] = [];
		const writer = new UpdateWriter(
			{ query: async () => ({}) as never },
			500,
			async (_db, items) => {
				starts.push(performance.now());
				batches.push(items.map((i) => i.update[0]));
				return items.map((i) => `seq${i.update[0]}`);
			},
			undefined,
			() => {},
			{ minGapMs: 60 }
		);
		const t0 = performance.now();
		await writer.enqueue(item(1));
		// Nothing waited for the first one.
		expect(starts[0] - t0).toBeLessThan(30);
		// Four more right after it, from two boards: one commit, no earlier than the interval.
		const rest = [writer.enqueue(item(2)), writer.enqueue(item(3, 'c')), writer.enqueue(item(4)), writer.enqueue(item(5, 'c'))];
		await expect(Promise.all(rest)).resolves.toEqual(['seq2', 'seq3', 'seq4', 'seq5']);
		expect(batches).toEqual([[1], [2, 4, 3, 5]]);
		expect(starts[1] - starts[0]).toBeGreaterThanOrEqual(59);
		// Long after the last commit began, a new update is written at once again.
		await new Promise((r) => setTimeout(r, 80));
		const t1 = performance.now();
		await writer.enqueue(item(6));
		expect(starts[2] - t1).toBeLessThan(30);
		await writer.close();
	});
});

describe('ByteBucket', () => {
	it('lets a message through while not in debt, then waits until the debt is paid off', () => {
		let t = 0;
		const b = new ByteBucket(1000, 4000, () => t);
		expect(spendOne(b, 3000)).toBe(0);
		expect(spendOne(b, 3000)).toBe(0); // 1000 left: through, into debt (-2000)
		expect(b.waitMs()).toBe(2001);
		t += 1000;
		expect(b.waitMs()).toBe(1001);
		t += 1001;
		expect(b.waitMs()).toBe(0);
		// A single message larger than the burst passes on a full bucket.
		t += 60_000;
		expect(b.tokens).toBe(4000);
		expect(spendOne(b, 100_000)).toBe(0);
		expect(b.waitMs()).toBeGreaterThan(90_000);
	});

	function spendOne(b: ByteBucket, n: number) {
		const w = b.waitMs();
		if (w === 0) b.take(n);
		return w;
	}

	it('spend charges both the connection and the board, and names the one in debt', () => {
		const t = 0;
		const socketA = new ByteBucket(100, 1000, () => t);
		const socketB = new ByteBucket(100, 1000, () => t);
		const board = new ByteBucket(100, 1500, () => t);
		expect(spend(socketA, board, 1200)).toEqual({ ok: true });
		const a = spend(socketA, board, 10);
		expect(a.ok).toBe(false);
		expect(!a.ok && a.who).toBe('connection');
		// Another connection on the same board: the board still has 300 left.
		expect(spend(socketB, board, 400)).toEqual({ ok: true });
		const b = spend(socketB, board, 10);
		expect(!b.ok && b.who).toBe('board');
	});
});

describe('DocumentSize', () => {
	it('keeps an upper bound and measures only near the limit', () => {
		const doc = new Y.Doc();
		doc.getText('t').insert(0, 'x'.repeat(1000));
		const size = new DocumentSize();
		const exact = size.measure(doc);
		expect(exact).toBeGreaterThan(1000);
		// Overwrites: the bound grows with every update, the document hardly.
		for (let i = 0; i < 50; i++) {
			const before = Y.encodeStateVector(doc);
			doc.getMap('m').set('k', i);
			size.grew(Y.encodeStateAsUpdate(doc, before).byteLength);
		}
		expect(size.bound).toBeGreaterThan(exact);
		const real = Y.encodeStateAsUpdate(doc).byteLength;
		expect(size.bound).toBeGreaterThanOrEqual(real);
		expect(size.fits(doc, 10, real + 10)).toBe(true); // bound too high: measured, fits
		expect(size.bound).toBe(real);
		expect(size.fits(doc, 11, real + 10)).toBe(false);
	});
});

describe('collab byte limits from the environment', () => {
	it('reads them and refuses nonsense', () => {
		const o = collabOptionsFromEnv({
			COLLAB_MAX_UPDATE_BYTES: '2048',
			COLLAB_BOARD_BYTE_BURST: '4096',
			COLLAB_SOCKET_BYTES_PER_SECOND: '8192'
		});
		expect([o.maxUpdateBytes, o.boardByteBurst, o.socketBytesPerSecond]).toEqual([2048, 4096, 8192]);
		expect(() => collabOptionsFromEnv({ COLLAB_MAX_DOCUMENT_BYTES: '12' })).toThrow(/COLLAB_MAX_DOCUMENT_BYTES/);
	});
});

describe('buildsOnMissing', () => {
	it('tells an update that continues from changes the document lacks from one it can apply', () => {
		const author = new Y.Doc();
		const updates: Uint8Array[] = [];
		author.on('update', (u: Uint8Array) => updates.push(u));
		for (let i = 0; i < 3; i++) author.getMap('points').set(`p${i}`, `v${i}`);
		const server = new Y.Doc();
		// The first applies; the second builds on the first, which the server does not have yet.
		expect(buildsOnMissing(server, decodeUpdateStrict(updates[0]))).toBe(false);
		expect(buildsOnMissing(server, decodeUpdateStrict(updates[1]))).toBe(true);
		// Several of one client's changes in one update, in order: applicable as a whole.
		expect(buildsOnMissing(server, decodeUpdateStrict(Y.mergeUpdates(updates)))).toBe(false);
		Y.applyUpdate(server, updates[0]);
		expect(buildsOnMissing(server, decodeUpdateStrict(updates[1]))).toBe(false);
		expect(buildsOnMissing(server, decodeUpdateStrict(updates[2]))).toBe(true);
		// The last two merged, with the first missing still: a gap.
		expect(buildsOnMissing(new Y.Doc(), decodeUpdateStrict(Y.mergeUpdates([updates[1], updates[2]])))).toBe(true);
	});
});
