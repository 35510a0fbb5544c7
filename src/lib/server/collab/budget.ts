// Byte budgets of the live board: how many bytes of updates a socket and a board may send per
// second, and how large a board's document may grow. A socket or board over its budget has its
// updates answered "not stored yet, send again in N ms" (the client keeps the change and sends
// it later, merged with whatever followed); other boards are not touched. See config.ts for the
// limits and why they are where they are.
import * as Y from 'yjs';

/**
 * A token bucket counted in bytes. A message is let through whenever the bucket is not in debt,
 * even one larger than what is left (or than the burst): the bucket then goes into debt and the
 * next message waits until it is paid off. So a single large update (a day of offline work)
 * always gets through on a quiet socket, and the average stays at `perSecond`.
 */
export class ByteBucket {
	#tokens: number;
	#last: number;
	constructor(
		readonly perSecond: number,
		readonly burst: number,
		private readonly now: () => number = () => performance.now()
	) {
		this.#tokens = burst;
		this.#last = this.now();
	}

	#refill() {
		const t = this.now();
		this.#tokens = Math.min(this.burst, this.#tokens + ((t - this.#last) / 1000) * this.perSecond);
		this.#last = t;
	}

	/** Milliseconds until a message may pass (0: now). */
	waitMs(): number {
		this.#refill();
		return this.#tokens > 0 ? 0 : Math.ceil(((1 - this.#tokens) / this.perSecond) * 1000);
	}

	/** Charges `bytes` (call only after waitMs() returned 0). */
	take(bytes: number) {
		this.#refill();
		this.#tokens -= bytes;
	}

	get tokens() {
		this.#refill();
		return this.#tokens;
	}
}

export type BudgetVerdict = { ok: true } | { ok: false; retryAfterMs: number; who: 'connection' | 'board' };

/** Lets `bytes` through if neither the socket's nor the board's bucket is in debt, charging both. */
export function spend(socket: ByteBucket, board: ByteBucket, bytes: number): BudgetVerdict {
	const s = socket.waitMs();
	const b = board.waitMs();
	if (s > 0 || b > 0) return { ok: false, retryAfterMs: Math.max(s, b), who: s >= b ? 'connection' : 'board' };
	socket.take(bytes);
	board.take(bytes);
	return { ok: true };
}

/**
 * The size of a board's document, encoded, kept as an upper bound without encoding it on every
 * update: the measured size plus every update applied since (an update never adds more than its
 * own length to the merged document). Only when the bound would pass the limit is the document
 * measured again.
 */
export class DocumentSize {
	#bound = 0;
	measured = 0;

	/** After loading: the exact size. */
	measure(doc: Y.Doc): number {
		this.measured = Y.encodeStateAsUpdate(doc).byteLength;
		this.#bound = this.measured;
		return this.measured;
	}

	/** An update was applied (stored here, relayed, caught up). */
	grew(bytes: number) {
		this.#bound += bytes;
	}

	get bound() {
		return this.#bound;
	}

	/** Would the document stay within `max` after `bytes` more? Measures only near the limit. */
	fits(doc: Y.Doc, bytes: number, max: number): boolean {
		if (this.#bound + bytes <= max) return true;
		return this.measure(doc) + bytes <= max;
	}
}

export function kib(bytes: number) {
	return bytes >= 1024 * 1024 ? `${(bytes / 1024 / 1024).toFixed(1)} MB` : `${Math.ceil(bytes / 1024)} KB`;
}
