// Lost database connections: which errors count as one, and the adapter's pool wrapper that
// gives a lost LISTEN client back to the pool exactly once and reports the listener's state.
import { describe, expect, it } from 'vitest';
import { EventEmitter } from 'node:events';
import type pg from 'pg';
import { isConnectionError } from '../../../src/lib/server/db-health';
import { adapterPool, ADAPTER_PART } from '../../../src/lib/server/collab/adapter-pool';

describe('isConnectionError', () => {
	it('knows a lost connection from a bug', () => {
		expect(isConnectionError(new Error('Connection terminated unexpectedly'))).toBe(true);
		expect(isConnectionError(Object.assign(new Error('terminating connection due to administrator command'), { code: '57P01' }))).toBe(
			true
		);
		expect(isConnectionError(Object.assign(new Error('connect ECONNREFUSED 127.0.0.1:5432'), { code: 'ECONNREFUSED' }))).toBe(true);
		expect(isConnectionError(Object.assign(new Error('the database system is starting up'), { code: '57P03' }))).toBe(true);
		expect(isConnectionError(new TypeError("Cannot read properties of undefined (reading 'id')"))).toBe(false);
		expect(isConnectionError(Object.assign(new Error('duplicate key value'), { code: '23505' }))).toBe(false);
		expect(isConnectionError(null)).toBe(false);
	});
});

describe('adapterPool', () => {
	function fakePool(fail = false) {
		const released: Array<unknown> = [];
		const client = Object.assign(new EventEmitter(), {
			release: (err?: unknown) => {
				if (released.length) throw new Error('Release called on client which has already been released to the pool.');
				released.push(err ?? 'ok');
			}
		});
		const pool = {
			connect: async () => {
				if (fail) throw new Error('connect ECONNREFUSED');
				return client;
			},
			query: async () => ({ rows: [] }),
			on: () => pool,
			end: async () => {}
		};
		return { pool: pool as unknown as pg.Pool, client, released };
	}

	it('gives a lost client back once, as broken, however often it reports the loss, and says the listener is down', async () => {
		const { pool, client, released } = fakePool();
		const reports: string[] = [];
		const wrapped = adapterPool(pool, (part, status) => reports.push(`${part}:${status}`));
		const c = await wrapped.connect();
		expect(c).toBe(client);
		expect(reports).toEqual([`${ADAPTER_PART}:up`]);
		// No listener of the adapter's own: without the wrapper's, this would throw.
		client.emit('error', new Error('terminating connection due to administrator command'));
		client.emit('error', new Error('Connection terminated unexpectedly'));
		client.emit('end');
		expect(released).toHaveLength(1);
		expect((released[0] as Error).message).toMatch(/administrator command/);
		expect(reports.at(-1)).toBe(`${ADAPTER_PART}:down`);
		// The adapter's own release at shutdown is harmless now.
		expect(() => c.release()).not.toThrow();
	});

	it('reports the listener down when it cannot connect', async () => {
		const { pool } = fakePool(true);
		const reports: string[] = [];
		await expect(adapterPool(pool, (part, status) => reports.push(status)).connect()).rejects.toThrow(/ECONNREFUSED/);
		expect(reports).toEqual(['down']);
	});
});
