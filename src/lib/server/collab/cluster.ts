// How many other server processes share this database, for the relays: with none, nothing is
// sent to them. Asked through the adapter's public serverCount() (the PostgreSQL adapter counts
// the nodes it has heard from within its heartbeat timeout). It is async: a relay asks it afresh
// before sending (`toOthers`; in order, the PostgreSQL adapter answers at once), and the last
// answer is kept, refreshed on a timer and whenever another process speaks, for code that must
// decide at once (`others`).
import type { Server } from 'socket.io';

/** Events between the processes (socket.io serverSideEmit). */
export const RELAY_UPDATE = 'collab:update';
export const RELAY_AWARENESS = 'collab:awareness';
/** A process that has just opened a board asks the others for the presence they hold. */
export const RELAY_PRESENCE_REQUEST = 'collab:presence?';

export class ClusterView {
	#others = 0;
	#timer: ReturnType<typeof setInterval> | null = null;

	constructor(
		private readonly io: Server,
		readonly enabled: boolean,
		refreshMs = 1000
	) {
		if (!enabled) return;
		void this.refresh();
		this.#timer = setInterval(() => void this.refresh(), refreshMs);
		this.#timer.unref?.();
	}

	/** Other processes as last counted (0 when the live board runs alone). */
	get others(): number {
		return this.enabled ? this.#others : 0;
	}

	/** Another process just spoke: it exists, whatever the last count said; count afresh. */
	heard() {
		if (!this.enabled) return;
		this.#others = Math.max(this.#others, 1);
		void this.refresh();
	}

	async refresh(): Promise<number> {
		try {
			this.#others = Math.max(0, (await this.io.of('/').adapter.serverCount()) - 1);
		} catch {
			// Keep the last count; the next round asks again.
		}
		return this.#others;
	}

	/** Runs `send` if any other process is there now (never for a live board alone). */
	toOthers(send: () => void) {
		if (!this.enabled) return;
		void this.refresh().then((n) => {
			if (n > 0) send();
		});
	}

	close() {
		if (this.#timer) clearInterval(this.#timer);
		this.#timer = null;
	}
}
