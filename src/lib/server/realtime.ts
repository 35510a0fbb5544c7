// socket.io on the app's own HTTP server, built with the app so a process has one module
// instance: the handshake checks the session with the same lucia instance and database pool as
// the pages (context.ts), and the live board (collab/) queries through that pool too. Only the
// writer's appends with the board-state LISTEN connection ('spotface-collab') and the socket.io
// PostgreSQL adapter ('spotface-adapter', several processes on one database) have pools of their
// own. hooks.server.ts publishes `attachRealtime` for server/index.js; `npm run dev` loads this
// module through Vite (server/dev-plugin.ts).
import type { Server as HttpServer } from 'node:http';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import pg from 'pg';
import { Server } from 'socket.io';
import { createAdapter } from '@socket.io/postgres-adapter';
import { context } from './context';
import { attachCollab } from './collab/server';
import { collabOptionsFromEnv, type CollabOptions } from './collab/config';
import { guardPool, isConnectionError } from './db-health';
import { ADAPTER_POOL_NAME, COLLAB_POOL_NAME } from './db/index';
import { adapterPool as guardedAdapterPool } from './collab/adapter-pool';
import { coalesceWebSocketWrites } from './collab/ws-writes';
import { viewerFromSession } from './auth/viewer';
import type { Viewer } from './auth/lucia';
import type { HandshakeErrorData } from '../board/sync/protocol';

/** Where hooks.server.ts publishes the attach function for the production entry (server/index.js). */
export const REALTIME_KEY = Symbol.for('spotface.realtime');

export interface RealtimeOptions {
	/** Live board limits and timings; defaults from the environment (COLLAB_*). */
	collab?: CollabOptions;
}

export interface Realtime {
	io: Server;
	close(): Promise<void>;
}

/** What server/index.js finds under REALTIME_KEY on globalThis. */
export interface RealtimeEntry {
	attachRealtime(httpServer: HttpServer, opts?: RealtimeOptions): Realtime;
	isConnectionError(err: unknown): boolean;
}

export function attachRealtime(httpServer: HttpServer, opts: RealtimeOptions = {}): Realtime {
	const { handle, auth, config } = context();
	const collabOptions = opts.collab ?? collabOptionsFromEnv(process.env);
	const io = new Server(httpServer, {
		path: '/socket.io',
		serveClient: false,
		// Above the collab limit, so an oversized board message reaches the collab layer, which
		// logs why it closes the socket; engine.io cuts off anything larger still.
		maxHttpBufferSize: Math.max(2_000_000, collabOptions.maxMessageBytes + 64_000),
		cors: { origin: config.origin, credentials: true },
		// Browsers send Origin on the WebSocket handshake too; only the app's own pages may connect
		// with the session cookie. (Node clients send none.)
		allowRequest: (req, callback) => {
			const origin = req.headers.origin;
			callback(null, !origin || origin === config.origin);
		}
	});
	// One write to the network per connection and tick, not one per WebSocket frame (ws-writes.ts).
	coalesceWebSocketWrites(io);
	// The writer (group commit, at most a few connections at a time) and one LISTEN connection.
	const collabPool = guardPool(
		new pg.Pool({ connectionString: config.databaseUrl, max: 4, application_name: COLLAB_POOL_NAME }),
		'live-board pool'
	);
	let adapterPool: pg.Pool | null = null;
	if (collabOptions.cluster) {
		adapterPool = guardPool(
			new pg.Pool({ connectionString: config.databaseUrl, max: 4, application_name: ADAPTER_POOL_NAME }),
			'adapter pool'
		);
		io.adapter(
			// Its LISTEN client gets an error listener and is given back broken when lost (see adapter-pool.ts).
			createAdapter(guardedAdapterPool(adapterPool), {
				heartbeatInterval: 2000,
				heartbeatTimeout: 6000,
				errorHandler: (err) => console.error('[realtime] adapter:', err.message)
			})
		);
	}

	io.use(async (socket, next) => {
		try {
			const found = await viewerFromSession(auth, handle.db, auth.readSessionCookie(socket.handshake.headers.cookie ?? ''));
			if (!found.ok) {
				const why = { 'no-session': 'sign in first', expired: 'session expired', 'not-a-member': 'not a member' }[found.reason];
				return next(new Error(`unauthorised: ${why}`));
			}
			const viewer: Viewer = found.viewer;
			socket.data.viewer = viewer;
			next();
		} catch (err) {
			console.error('[realtime] handshake failed:', (err as Error).message);
			// The session could not be checked (the database is away): not a refusal, try again.
			const e = new Error(isConnectionError(err) ? 'the server cannot check the session just now' : 'unauthorised') as Error & {
				data?: HandshakeErrorData;
			};
			e.data = { retry: true };
			next(e);
		}
	});

	const collab = attachCollab({ io, db: handle.db, pool: collabPool, options: collabOptions });
	// `kill -USR2 <pid>` prints what the live board holds in this process: rooms, sockets, storage
	// timings, event-loop delay and memory (after a full collection when run with --expose-gc).
	const loopDelay = monitorEventLoopDelay({ resolution: 1 });
	loopDelay.enable();
	const printStats = () => {
		(globalThis as { gc?: () => void }).gc?.();
		const m = process.memoryUsage();
		const s = collab.stats();
		console.log(
			`[collab] stats rooms=${s.rooms} sockets=${s.sockets} pendingWrites=${s.pendingWrites} batches=${s.writer.batches} rows=${s.writer.rows}` +
				` largestBatch=${s.writer.largestBatch} storeP50Ms=${s.storeMs?.p50.toFixed(2) ?? 0} storeP99Ms=${s.storeMs?.p99.toFixed(2) ?? 0}` +
				// The histogram holds whole timer intervals: less the 1 ms resolution, it is the lag.
				` loopDelayP99Ms=${Math.max(0, loopDelay.percentile(99) / 1e6 - 1).toFixed(2)} loopDelayMaxMs=${Math.max(0, loopDelay.max / 1e6 - 1).toFixed(2)}` +
				` rssMB=${(m.rss / 2 ** 20).toFixed(1)} heapUsedMB=${(m.heapUsed / 2 ** 20).toFixed(1)}`
		);
		loopDelay.reset();
	};
	process.on('SIGUSR2', printStats);

	return {
		io,
		async close() {
			process.off('SIGUSR2', printStats);
			loopDelay.disable();
			await new Promise<void>((resolve) => io.close(() => resolve()));
			await collab.close();
			await adapterPool?.end().catch(() => {});
			await collabPool.end().catch(() => {});
		}
	};
}

/** Makes the attach function reachable from the production entry; called once the app initialises. */
export function publishRealtime() {
	const entry: RealtimeEntry = { attachRealtime, isConnectionError };
	(globalThis as Record<symbol, unknown>)[REALTIME_KEY] = entry;
}
