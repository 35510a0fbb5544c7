// Group commit for board updates: one INSERT in flight at a time; whatever arrives meanwhile
// goes into the next one. An update is answered only once its batch is committed. When the
// database fails, the batch stays in memory and is retried with back-off, so nothing that was
// accepted is lost while the process lives (and nothing unstored is ever acknowledged).
import { appendUpdates, type PendingUpdate, type Queryable } from './persistence';

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
	stats = { batches: 0, rows: 0, failures: 0, largestBatch: 0 };
	/** Milliseconds per batch (append + commit), the latest ones, for percentiles. */
	#timings = new Float64Array(4096);
	#timed = 0;

	constructor(
		private readonly db: Queryable,
		private readonly maxBatch = 500,
		private readonly store: (db: Queryable, items: PendingUpdate[]) => Promise<(string | null)[]> = appendUpdates
	) {}

	/** Resolves with the stored seq, or null when the database refused it (permission, state). */
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
						batch.forEach((w, i) => w.resolve(seqs[i]));
						break;
					} catch (e) {
						this.stats.failures++;
						if (this.#closed && attempt >= 2) {
							batch.forEach((w) => w.reject(e as Error));
							break;
						}
						const wait = Math.min(5000, 100 * 2 ** attempt);
						console.error(`[collab] storing ${batch.length} update(s) failed (${(e as Error).message}); retrying in ${wait} ms`);
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
		await this.drain();
	}
}
