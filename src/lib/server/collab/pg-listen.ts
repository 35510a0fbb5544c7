// One connection kept in LISTEN on a channel, for as long as the process runs: when the
// connection is lost (terminated, the database restarted) it is given back to the pool as broken
// and a new one is opened with back-off (0.5 s doubling to 5 s). Its state goes to db-health.
import type pg from 'pg';
import { forgetHealth, reportHealth } from '../db-health';

export interface Listening {
	/** True while a LISTEN connection is open. */
	readonly up: boolean;
	close(): Promise<void>;
}

export function listenForever(
	pool: pg.Pool,
	channel: string,
	opts: {
		part: string;
		onNotify(payload: string): void;
		/** After every (re)connection: whatever was announced meanwhile was missed. */
		onConnected?(): void;
		log?: Pick<Console, 'error'>;
	}
): Listening {
	const log = opts.log ?? console;
	let client: { c: pg.PoolClient; release(e?: Error): void } | null = null;
	let timer: ReturnType<typeof setTimeout> | null = null;
	let closed = false;
	let failures = 0;

	const retry = () => {
		if (closed || timer) return;
		const wait = Math.min(5000, 500 * 2 ** Math.min(failures++, 4));
		timer = setTimeout(() => {
			timer = null;
			void connect();
		}, wait);
		timer.unref?.();
	};

	async function connect() {
		if (closed) return;
		let c: pg.PoolClient;
		try {
			c = await pool.connect();
		} catch (e) {
			reportHealth(opts.part, 'down', (e as Error).message);
			return retry();
		}
		let released = false;
		// A connection may report its loss twice (the server's message, then the closed socket).
		const release = (e?: Error) => {
			if (released) return false;
			released = true;
			c.release(e);
			return true;
		};
		const lost = (e: Error) => {
			if (client?.c === c) client = null;
			if (!release(e) || closed) return;
			log.error(`[collab] ${opts.part}: ${e.message}; reconnecting`);
			reportHealth(opts.part, 'down', e.message);
			retry();
		};
		c.on('error', lost);
		c.on('end', () => lost(new Error('connection ended')));
		c.on('notification', (msg) => {
			if (msg.channel === channel && msg.payload) opts.onNotify(msg.payload);
		});
		try {
			await c.query(`LISTEN ${channel}`);
		} catch (e) {
			return lost(e as Error);
		}
		if (closed) {
			release();
			return;
		}
		client = { c, release };
		failures = 0;
		reportHealth(opts.part, 'up');
		opts.onConnected?.();
	}
	void connect();

	return {
		get up() {
			return client !== null;
		},
		async close() {
			closed = true;
			if (timer) clearTimeout(timer);
			forgetHealth(opts.part);
			const held = client;
			client = null;
			if (!held) return;
			await held.c.query(`UNLISTEN ${channel}`).catch(() => {});
			held.release();
		}
	};
}
