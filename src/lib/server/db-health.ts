// What this process knows about its database connections, for /api/health and the logs: every
// part that holds a connection (the board-state listener, the socket.io adapter's listener, the
// board writer) reports 'up' or 'down' here. Pages and the live board are one module graph
// (src/lib/server/realtime.ts is built with the app); the record still lives on globalThis under
// a registered symbol so that a module Vite reloads in `npm run dev` keeps it.
//
// Also: guardPool, which makes sure no connection a pool hands out can crash the process.
import type pg from 'pg';

export interface PartHealth {
	status: 'up' | 'down';
	/** Why it is down (the last error), when it is. */
	error?: string;
	/** When the status last changed (ISO time). */
	since: string;
}

const KEY = Symbol.for('spotface.db-health');
type Registry = Map<string, PartHealth>;

function registry(): Registry {
	const g = globalThis as unknown as Record<symbol, Registry | undefined>;
	return (g[KEY] ??= new Map());
}

/** Records a part's state; logs when it changes. */
export function reportHealth(part: string, status: 'up' | 'down', error?: string) {
	const r = registry();
	const before = r.get(part);
	if (before?.status === status) {
		if (status === 'down' && error) before.error = error;
		return;
	}
	r.set(part, { status, error: status === 'down' ? error : undefined, since: new Date().toISOString() });
	if (status === 'down') console.error(`[db] ${part} is down: ${error ?? 'unknown error'}`);
	else if (before) console.log(`[db] ${part} is up again`);
}

/** Forgets a part (it was closed on purpose). */
export function forgetHealth(part: string) {
	registry().delete(part);
}

export function healthReport(): Record<string, PartHealth> {
	return Object.fromEntries(registry());
}

/** Errors that mean "the database connection went away", as opposed to a bug. */
export function isConnectionError(e: unknown): boolean {
	if (!e || typeof e !== 'object') return false;
	const err = e as { code?: unknown; message?: unknown };
	const code = typeof err.code === 'string' ? err.code : '';
	// 57P01 admin shutdown / terminated, 57P02 crash shutdown, 57P03 cannot connect now,
	// 08xxx connection exceptions; socket errors from the driver.
	if (/^(57P0[123]|08...)$/.test(code)) return true;
	if (['ECONNREFUSED', 'ECONNRESET', 'EPIPE', 'ETIMEDOUT', 'ENOTFOUND', 'EHOSTUNREACH'].includes(code)) return true;
	const message = typeof err.message === 'string' ? err.message : '';
	return /Connection terminated|terminating connection|Client has encountered a connection error|timeout exceeded when trying to connect|the database system is (starting up|shutting down)|Client was closed and is not queryable/.test(
		message
	);
}

/**
 * Gives every connection the pool opens an 'error' listener. A pg client whose connection dies
 * emits 'error' even while it is checked out (a transaction between two statements, a LISTEN
 * client held by a library); with no listener that ends the process. The pool itself removes
 * a broken client when it is released (or at once when idle); whoever holds it sees the failure
 * on their next query.
 */
export function guardPool(pool: pg.Pool, label: string): pg.Pool {
	pool.on('error', (err) => console.error(`[db] ${label}: idle connection lost: ${err.message}`));
	pool.on('connect', (client) => {
		client.on('error', (err) => console.error(`[db] ${label}: connection lost: ${err.message}`));
	});
	return pool;
}
