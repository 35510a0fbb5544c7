// socket.io on the same HTTP server as the app. The handshake requires a valid session; the
// live board (src/lib/server/collab) builds on the authenticated socket. With several server
// processes on one database, the socket.io PostgreSQL adapter keeps their rooms in step.
import type { Server as HttpServer } from 'node:http';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import pg from 'pg';
import { Server } from 'socket.io';
import { createAdapter } from '@socket.io/postgres-adapter';
import { attachCollab } from '../src/lib/server/collab/server';
import { collabOptionsFromEnv, type CollabOptions } from '../src/lib/server/collab/config';
import { createDb } from '../src/lib/server/db/index';
import { guardPool, isConnectionError } from '../src/lib/server/db-health';
import { adapterPool as guardedAdapterPool } from '../src/lib/server/collab/adapter-pool';
import { createAuth } from '../src/lib/server/auth/lucia';
import { viewerFromSession } from '../src/lib/server/auth/viewer';
import type { Viewer } from '../src/lib/server/auth/lucia';
import type { HandshakeErrorData } from '../src/lib/board/sync/protocol';

export interface RealtimeOptions {
	databaseUrl: string;
	origin: string;
	/** Live board limits and timings; defaults from the environment (COLLAB_*). */
	collab?: CollabOptions;
}

export function attachRealtime(httpServer: HttpServer, opts: RealtimeOptions) {
	const handle = createDb(opts.databaseUrl, 10, 'live-board pool');
	const auth = createAuth(handle.pool, { secure: opts.origin.startsWith('https:') });
	const collabOptions = opts.collab ?? collabOptionsFromEnv(process.env);
	const io = new Server(httpServer, {
		path: '/socket.io',
		serveClient: false,
		// Above the collab limit, so an oversized board message reaches the collab layer, which
		// logs why it closes the socket; engine.io cuts off anything larger still.
		maxHttpBufferSize: Math.max(2_000_000, collabOptions.maxMessageBytes + 64_000),
		cors: { origin: opts.origin, credentials: true },
		// Browsers send Origin on the WebSocket handshake too; only the app's own pages may connect
		// with the session cookie. (Node clients send none.)
		allowRequest: (req, callback) => {
			const origin = req.headers.origin;
			callback(null, !origin || origin === opts.origin);
		}
	});
	let adapterPool: pg.Pool | null = null;
	if (collabOptions.cluster) {
		adapterPool = guardPool(new pg.Pool({ connectionString: opts.databaseUrl, max: 4 }), 'adapter pool');
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
			const e = new Error(isConnectionError(err) ? 'the server cannot check the session just now' : 'unauthorised') as Error & { data?: HandshakeErrorData };
			e.data = { retry: true };
			next(e);
		}
	});

	const collab = attachCollab({ io, db: handle.db, pool: handle.pool, options: collabOptions });
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
		db: handle.db,
		collab,
		async close() {
			process.off('SIGUSR2', printStats);
			loopDelay.disable();
			await new Promise<void>((resolve) => io.close(() => resolve()));
			await collab.close();
			await adapterPool?.end().catch(() => {});
			await handle.close();
		}
	};
}
