// Group commit for board updates: one INSERT in flight at a time; whatever arrives meanwhile
// goes into the next one. An update is answered only once its batch is committed. When the
// database fails, the batch is tried a few more times with a short back-off (a dropped
// connection is replaced by the pool at once); if it still fails, every update of the batch is
// rejected with StorageUnavailable: the sender is told "not stored, try again later" and keeps
// its change. Nothing unstored is ever acknowledged. While the database is away the writer
// reports 'down' (see db-health.ts) and probes it until it answers.
import { appendUpdates, type PendingUpdate, type Queryable } from './persistence';
import { reportHealth } from '../db-health';

export const WRITER_PART = 'board writer';

/** The database could not store the update now; the sender should keep it and send it again. */
export class StorageUnavailable extends Error {}

export interface WriterRetry {
	/** Tries per batch before its updates are rejected (the first one included). */
	attempts: number;
	/** Wait before the second try; doubles for each further one. */
	baseDelayMs: number;
	/** While down, check the database this often until it answers. */
	probeMs: number;
}

export const DEFAULT_WRITER_RETRY: WriterRetry = { attempts: 3, baseDelayMs: 100, probeMs: 1000 };

interface Waiting {
	item: PendingUpdate;
	resolve(seq: string | null): void;
	reject(e: Error): void;
}

export class UpdateWriter {
	#queue: Waiting[] = [];
	#running = false;
	#closed = false;
	#idle: Array<() => void> = [];
	stats = { batches: 0, rows: 0, failures: 0, givenUp: 0, largestBatch: 0 };
	/** Milliseconds per batch (append + commit), the latest ones, for percentiles. */
	#timings = new Float64Array(4096);
	#timed = 0;

	#down = false;
	#probeTimer: ReturnType<typeof setTimeout> | null = null;

	constructor(
		private readonly db: Queryable,
		private readonly maxBatch = 500,
		private readonly store: (db: Queryable, items: PendingUpdate[]) => Promise<(string | null)[]> = appendUpdates,
		private readonly retry: WriterRetry = DEFAULT_WRITER_RETRY,
		private readonly report: typeof reportHealth = reportHealth
	) {}

	/** True after the last batch failed for good, until the database answers again. */
	get down() {
		return this.#down;
	}

	#setDown(down: boolean, error?: string) {
		this.#down = down;
		this.report(WRITER_PART, down ? 'down' : 'up', error);
		if (down) this.#scheduleProbe();
		else if (this.#probeTimer) {
			clearTimeout(this.#probeTimer);
			this.#probeTimer = null;
		}
	}

	/** Nothing may arrive to be written: find out by itself when the database is back. */
	#scheduleProbe() {
		if (this.#probeTimer || this.#closed) return;
		this.#probeTimer = setTimeout(async () => {
			this.#probeTimer = null;
			if (!this.#down || this.#closed) return;
			try {
				await this.db.query({ text: 'select 1' });
				if (this.#down && !this.#running) this.#setDown(false);
			} catch (e) {
				this.report(WRITER_PART, 'down', (e as Error).message);
				this.#scheduleProbe();
			}
		}, this.retry.probeMs);
		this.#probeTimer.unref?.();
	}

	/**
	 * Resolves with the stored seq, or null when the database refused it (permission, state);
	 * rejects with StorageUnavailable when the database could not be reached.
	 */
	enqueue(item: PendingUpdate): Promise<string | null> {
		if (this.#closed) return Promise.reject(new Error('writer closed'));
		return new Promise((resolve, reject) => {
			this.#queue.push({ item, resolve, reject });
			void this.#pump();
		});
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
		return this.#queue.length;
	}

	async #pump() {
		if (this.#running) return;
		this.#running = true;
		try {
			while (this.#queue.length) {
				const batch = this.#queue.splice(0, this.maxBatch);
				for (let attempt = 0; ; attempt++) {
					try {
						const started = performance.now();
						const seqs = await this.store(
							this.db,
							batch.map((w) => w.item)
						);
						this.#timings[this.#timed++ % this.#timings.length] = performance.now() - started;
						this.stats.batches++;
						this.stats.rows += batch.length;
						this.stats.largestBatch = Math.max(this.stats.largestBatch, batch.length);
						if (this.#down) this.#setDown(false);
						batch.forEach((w, i) => w.resolve(seqs[i]));
						break;
					} catch (e) {
						this.stats.failures++;
						const message = (e as Error).message;
						if (attempt + 1 >= this.retry.attempts) {
							console.error(
								`[collab] storing ${batch.length} update(s) failed ${attempt + 1} times (${message}); the senders keep them and try again`
							);
							this.stats.givenUp += batch.length;
							this.#setDown(true, message);
							const err = new StorageUnavailable(`the database is not reachable (${message})`);
							batch.forEach((w) => w.reject(err));
							break;
						}
						const wait = this.retry.baseDelayMs * 2 ** attempt;
						console.error(`[collab] storing ${batch.length} update(s) failed (${message}); retrying in ${wait} ms`);
						await new Promise((r) => setTimeout(r, wait));
					}
				}
			}
		} finally {
			this.#running = false;
			for (const f of this.#idle.splice(0)) f();
		}
	}

	/** Waits until everything queued is stored (or given up after close). */
	drain(): Promise<void> {
		if (!this.#running && this.#queue.length === 0) return Promise.resolve();
		return new Promise((r) => this.#idle.push(r));
	}

	async close() {
		this.#closed = true;
		if (this.#probeTimer) clearTimeout(this.#probeTimer);
		this.#probeTimer = null;
		await this.drain();
	}
}
