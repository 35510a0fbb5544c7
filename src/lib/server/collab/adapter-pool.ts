// The pool handed to the socket.io PostgreSQL adapter. The adapter (0.5.0) checks one client
// out of it and keeps it in LISTEN; it listens for that client's 'end' to reconnect but adds no
// 'error' listener (an unhandled 'error' ends the process) and never gives a dead client back
// (after a few lost connections the pool would be full of them and the adapter would wait
// forever). Every client it checks out here gets an 'error' listener, goes back to the pool as
// broken once its connection is gone, and reports the listener's state for /api/health. Queries
// (publishing) go straight to the pool.
import type pg from 'pg';
import { reportHealth } from '../db-health';

export const ADAPTER_PART = 'socket.io adapter listener';

export function adapterPool(pool: pg.Pool, report: typeof reportHealth = reportHealth): pg.Pool {
	let held = 0;
	const wrapped = {
		query: pool.query.bind(pool),
		on: pool.on.bind(pool),
		end: pool.end.bind(pool),
		async connect(): Promise<pg.PoolClient> {
			let client: pg.PoolClient;
			try {
				client = await pool.connect();
			} catch (e) {
				report(ADAPTER_PART, 'down', (e as Error).message);
				throw e;
			}
			held++;
			const release = client.release.bind(client);
			let released = false;
			const releaseOnce = (err?: Error | boolean) => {
				if (released) return;
				released = true;
				held--;
				release(err);
			};
			client.release = releaseOnce;
			const lost = (err: Error) => {
				report(ADAPTER_PART, 'down', err.message);
				// Broken: the pool drops it instead of handing it out again.
				releaseOnce(err);
			};
			client.on('error', lost);
			client.on('end', () => lost(new Error('connection ended')));
			report(ADAPTER_PART, 'up');
			return client;
		},
		/** Clients the adapter holds now (its LISTEN connection). */
		get held() {
			return held;
		}
	};
	return wrapped as unknown as pg.Pool;
}
