// Group commit for board updates, per board in order and across boards together.
//
// Every board has its own queue. A batch takes whatever is waiting on the boards that have no
// batch in flight and writes it in one INSERT, so updates of many boards share one commit; up to
// `maxInFlight` batches run at once (on different connections), so a board whose write is slow
// (e.g. waiting for an approval's row lock) holds one connection, not everyone. A board has at
// most one batch in flight: its updates are stored, and answered, in the order they came.
//
// Batches start at most every `minGapMs` (collab option commitIntervalMs): under load the updates
// that arrive in between share the next commit, and each commit's cost (a round trip, a WAL
// flush) is spread over more of them; when the last batch began long enough ago, a new one
// starts at once, so a quiet board waits for nothing.
//
// When a batch fails, each of its boards is tried again alone after a back-off (100 ms, doubling
// to `maxDelayMs`), so one board's failing write does not stall the others. After `attempts`
// failed tries the waiting senders are answered with StorageUnavailable ("not stored, try again
// later"; they keep their change), but the updates stay queued and are tried again until stored:
// the room's document may already hold them (hooks/broadcast.ts sends an update to the peers
// before it is stored), so the server must not forget them while it runs. Nothing unstored is ever
// acknowledged. While a board gives up, the writer reports 'down' (db-health.ts); callers ask
// `accepting(boardId)` before they take new updates for it.
import { appendUpdates, type PendingUpdate, type Queryable } from './persistence';
import { reportHealth } from '../db-health';

export const WRITER_PART = 'board writer';

/** The database could not store the update now; the sender should keep it and send it again. */
export class StorageUnavailable extends Error {}

export interface WriterRetry {
	/** Tries before the senders are answered StorageUnavailable (the first one included). */
	attempts: number;
	/** Wait before the second try; doubles for each further one... */
	baseDelayMs: number;
	/** ...up to this. */
	maxDelayMs: number;
}

export const DEFAULT_WRITER_RETRY: WriterRetry = { attempts: 3, baseDelayMs: 100, maxDelayMs: 2000 };

interface Waiting {
	/** null: a barrier, answered once everything before it on the board is stored. */
	item: PendingUpdate | null;
	settled: boolean;
	resolve(seq: string | null): void;
	reject(e: Error): void;
}

interface BoardQueue {
	id: string;
	waiting: Waiting[];
	inFlight: boolean;
	/** Failed tries in a row; > 0 means the board is written alone, after `retryAt`. */
	failures: number;
	retryAt: number;
	/** The senders were told StorageUnavailable: no new updates until this board is stored again. */
	givenUp: boolean;
	lastError: string;
}

export class UpdateWriter {
	#boards = new Map<string, BoardQueue>();
	#inFlight = 0;
	#closed = false;
	#idle: Array<() => void> = [];
	#wake: ReturnType<typeof setTimeout> | null = null;
	#wakeAt = Infinity;
	#down = false;
	stats = { batches: 0, rows: 0, failures: 0, givenUp: 0, largestBatch: 0 };
	/** Milliseconds per batch (append + commit), the latest ones, for percentiles. */
	#timings = new Float64Array(4096);
	#timed = 0;

	constructor(
		private readonly db: Queryable,
		private readonly maxBatch = 500,
		private readonly store: (db: Queryable, items: PendingUpdate[]) => Promise<(string | null)[]> = appendUpdates,
		private readonly retry: WriterRetry = DEFAULT_WRITER_RETRY,
		private readonly report: typeof reportHealth = reportHealth,
		{ maxInFlight = 2, minGapMs = 0 }: { maxInFlight?: number; minGapMs?: number } = {}
	) {
		this.maxInFlight = maxInFlight;
		this.minGapMs = minGapMs;
	}

	private readonly maxInFlight: number;
	private readonly minGapMs: number;

	#lastStart = -Infinity;

	/** True while some board's updates could not be stored after all tries. */
	get down() {
		return this.#down;
	}

	#updateHealth() {
		let failing: BoardQueue | null = null;
		for (const b of this.#boards.values()) if (b.givenUp) failing = b;
		const down = failing !== null;
		if (down === this.#down) return;
		this.#down = down;
		this.report(WRITER_PART, down ? 'down' : 'up', failing?.lastError);
	}

	/**
	 * False while the board's earlier updates could not be stored (after all tries): a new update
	 * should then be answered "not now" rather than taken, so what waits in memory stays bounded.
	 */
	accepting(boardId: string): boolean {
		return !this.#closed && !this.#boards.get(boardId)?.givenUp;
	}

	/**
	 * Resolves with the stored seq, or null when the database refused it (permission, state);
	 * rejects with StorageUnavailable when the database could not store it after all tries (the
	 * update stays queued and is stored when the database answers again).
	 */
	enqueue(item: PendingUpdate): Promise<string | null> {
		return this.#push(item.boardId, item);
	}

	/**
	 * Resolves once everything queued for the board before it is stored (at once when nothing
	 * is); rejects with StorageUnavailable while the board's updates cannot be stored.
	 */
	async stored(boardId: string): Promise<void> {
		const b = this.#boards.get(boardId);
		if (!b || b.waiting.length === 0) return;
		await this.#push(boardId, null);
	}

	#push(boardId: string, item: PendingUpdate | null): Promise<string | null> {
		if (this.#closed) return Promise.reject(new Error('writer closed'));
		let b = this.#boards.get(boardId);
		if (b?.givenUp) {
			return Promise.reject(new StorageUnavailable(`the database is not reachable (${b.lastError})`)).finally(() => {
				// An update refused here was never queued; a board given up keeps its own.
				if (item) this.#pushKept(b!, item);
			});
		}
		if (!b) {
			b = { id: boardId, waiting: [], inFlight: false, failures: 0, retryAt: 0, givenUp: false, lastError: '' };
			this.#boards.set(boardId, b);
		}
		const board = b;
		return new Promise((resolve, reject) => {
			board.waiting.push({ item, settled: false, resolve, reject });
			this.#pump();
		});
	}

	/** An update taken while its board was given up is still kept (the room may hold it). */
	#pushKept(b: BoardQueue, item: PendingUpdate) {
		b.waiting.push({ item, settled: true, resolve: () => {}, reject: () => {} });
		this.#pump();
	}

	/** p50 and p99 of the recent batch times (ms), or null before the first batch. */
	batchTimes(): { p50: number; p99: number } | null {
		const n = Math.min(this.#timed, this.#timings.length);
		if (n === 0) return null;
		const sorted = Array.from(this.#timings.subarray(0, n)).sort((a, b) => a - b);
		const at = (p: number) => sorted[Math.min(n - 1, Math.ceil(p * n) - 1)];
		return { p50: at(0.5), p99: at(0.99) };
	}

	get pending() {
		let n = 0;
		for (const b of this.#boards.values()) n += b.waiting.length;
		return n;
	}

	/** Answers barriers at the head of a board's queue; forgets an empty board. */
	#settleBarriers(b: BoardQueue) {
		while (b.waiting.length && b.waiting[0].item === null) {
			const w = b.waiting.shift()!;
			w.settled = true;
			w.resolve(null);
		}
		if (b.waiting.length === 0 && !b.inFlight && !b.givenUp) this.#boards.delete(b.id);
	}

	#pump() {
		if (this.#closed && this.#inFlight === 0 && this.pending === 0) return this.#notifyIdle();
		const now = performance.now();
		let nextRetry = Infinity;
		while (this.#inFlight < this.maxInFlight) {
			const batch: Array<{ board: BoardQueue; taken: Waiting[] }> = [];
			let rows = 0;
			for (const b of this.#boards.values()) {
				if (b.inFlight) continue;
				this.#settleBarriers(b);
				if (b.waiting.length === 0) continue;
				if (b.failures > 0) {
					if (b.retryAt > now) {
						nextRetry = Math.min(nextRetry, b.retryAt);
						continue;
					}
					// A board that failed is written alone until it succeeds.
					if (batch.length) continue;
				}
				if (batch.length && batch[0].board.failures > 0) break;
				const end = b.waiting.findIndex((w) => w.item === null);
				const upTo = Math.min(end === -1 ? b.waiting.length : end, Math.max(1, this.maxBatch - rows));
				if (rows > 0 && rows + upTo > this.maxBatch) break;
				batch.push({ board: b, taken: b.waiting.slice(0, upTo) });
				rows += upTo;
				if (b.failures > 0 || rows >= this.maxBatch) break;
			}
			if (batch.length === 0) break;
			if (now - this.#lastStart < this.minGapMs && !this.#closed) {
				// Too soon after the last commit began: what is waiting goes in the next one.
				nextRetry = Math.min(nextRetry, this.#lastStart + this.minGapMs);
				break;
			}
			this.#lastStart = now;
			for (const part of batch) part.board.inFlight = true;
			this.#inFlight++;
			void this.#write(batch);
		}
		if (nextRetry < Infinity) this.#wakeUpAt(nextRetry);
		if (this.#inFlight === 0 && this.pending === 0) this.#notifyIdle();
	}

	#wakeUpAt(at: number) {
		if (this.#wake && this.#wakeAt <= at) return;
		if (this.#wake) clearTimeout(this.#wake);
		this.#wakeAt = at;
		this.#wake = setTimeout(
			() => {
				this.#wake = null;
				this.#wakeAt = Infinity;
				this.#pump();
			},
			Math.max(0, at - performance.now())
		);
	}

	async #write(batch: Array<{ board: BoardQueue; taken: Waiting[] }>) {
		const items = batch.flatMap((p) => p.taken.map((w) => w.item!));
		try {
			const started = performance.now();
			const seqs = await this.store(this.db, items);
			this.#timings[this.#timed++ % this.#timings.length] = performance.now() - started;
			this.stats.batches++;
			this.stats.rows += items.length;
			this.stats.largestBatch = Math.max(this.stats.largestBatch, items.length);
			let i = 0;
			for (const { board, taken } of batch) {
				board.waiting.splice(0, taken.length);
				board.failures = 0;
				board.givenUp = false;
				for (const w of taken) {
					const seq = seqs[i++] ?? null;
					if (!w.settled) w.resolve(seq);
					w.settled = true;
				}
			}
		} catch (e) {
			this.stats.failures++;
			const message = (e as Error).message;
			for (const { board, taken } of batch) {
				board.failures++;
				board.lastError = message;
				board.retryAt = performance.now() + Math.min(this.retry.maxDelayMs, this.retry.baseDelayMs * 2 ** (board.failures - 1));
				if (board.failures >= this.retry.attempts && !board.givenUp) {
					board.givenUp = true;
					console.error(
						`[collab] storing ${taken.length} update(s) of board ${board.id} failed ${board.failures} times (${message}); the senders keep them and try again, and so does the server`
					);
					const err = new StorageUnavailable(`the database is not reachable (${message})`);
					for (const w of board.waiting) {
						if (w.settled) continue;
						w.settled = true;
						this.stats.givenUp++;
						w.reject(err);
					}
				} else if (!board.givenUp) {
					console.error(`[collab] storing ${taken.length} update(s) of board ${board.id} failed (${message}); retrying`);
				}
			}
		} finally {
			for (const { board } of batch) board.inFlight = false;
			this.#inFlight--;
			this.#updateHealth();
			for (const { board } of batch) this.#settleBarriers(board);
			if (this.#closed) {
				// Closing: what could not be stored now is left to the senders, who still hold it.
				for (const { board } of batch) if (board.failures > 0) this.#dropBoard(board);
			}
			this.#pump();
		}
	}

	#dropBoard(b: BoardQueue) {
		const err = new StorageUnavailable('the server is shutting down');
		for (const w of b.waiting) if (!w.settled) w.reject(err);
		b.waiting = [];
		this.#boards.delete(b.id);
	}

	#notifyIdle() {
		for (const f of this.#idle.splice(0)) f();
	}

	/** Waits until everything queued is stored (or given up after close). */
	drain(): Promise<void> {
		if (this.#inFlight === 0 && this.pending === 0) return Promise.resolve();
		return new Promise((r) => this.#idle.push(r));
	}

	async close() {
		this.#closed = true;
		if (this.#wake) clearTimeout(this.#wake);
		this.#wake = null;
		// Boards waiting for a retry are not tried again; their senders keep their changes.
		for (const b of [...this.#boards.values()]) if (!b.inFlight && b.failures > 0) this.#dropBoard(b);
		this.#pump();
		await this.drain();
	}
}
