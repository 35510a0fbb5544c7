// The production entry, plain JavaScript: one HTTP server that serves the built SvelteKit app and
// socket.io. socket.io is attached with the function the build itself publishes when it
// initialises (src/hooks.server.ts → src/lib/server/realtime.ts), so a process has one module
// instance: one database pool and one lucia instance for pages and the live board alike.
import { createServer } from 'node:http';

const REALTIME_KEY = Symbol.for('spotface.realtime');
/** @returns {{ attachRealtime: (server: import('node:http').Server) => { close(): Promise<void> }, isConnectionError: (err: unknown) => boolean } | undefined} */
const realtimeEntry = () => /** @type {any} */ (globalThis)[REALTIME_KEY];

// Last resort: every database client has an 'error' listener (db-health.ts guardPool,
// adapter-pool.ts, pg-listen.ts), so a lost connection should never get here. If one still
// does (a library's client we do not know of), it is logged and the process carries on: the
// pools drop broken connections by themselves. Anything else is a bug with unknown state
// behind it: log it and exit, and let the supervisor (npm start, systemd, …) start afresh.
/** @param {string} kind */
function lastResort(kind) {
	return (/** @type {unknown} */ err) => {
		if (realtimeEntry()?.isConnectionError(err)) {
			console.error(`[process] ${kind} from a lost database connection, carrying on:`, /** @type {Error} */ (err)?.message ?? err);
			return;
		}
		console.error(`[process] ${kind}; exiting:`, err);
		process.exit(1);
	};
}
process.on('uncaughtException', lastResort('uncaught exception'));
process.on('unhandledRejection', lastResort('unhandled rejection'));

const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 3000);
if (!process.env.DATABASE_URL) {
	console.error('DATABASE_URL is not set. Use `npm start`, or see .env.example.');
	process.exit(1);
}
process.env.ORIGIN ??= `http://${host === '0.0.0.0' ? '127.0.0.1' : host}:${port}`;

// Photo and drawing uploads go up to MEDIA_MAX_BYTES (25 MB by default): the adapter's body
// limit (512 kB unless set) must let them through; the upload route checks the real limit.
process.env.BODY_SIZE_LIMIT ??= String(Number(process.env.MEDIA_MAX_BYTES || 25 * 1024 * 1024) + 1024 * 1024);

// Importing the handler initialises the app (its init hook publishes the realtime entry).
const { handler } = await import('../build/handler.js');
const entry = realtimeEntry();
if (!entry) {
	console.error('The build does not provide the live board (src/hooks.server.ts init). Build the app again: npx vite build');
	process.exit(1);
}

const server = createServer();
server.on('request', handler);
// socket.io wraps the existing request listeners, so it is attached after the app handler.
const realtime = entry.attachRealtime(server);

server.listen(port, host, () => {
	const a = server.address();
	const actual = typeof a === 'object' && a ? a.port : port;
	console.log(`Spotface listening on http://${host}:${actual}`);
});

let closing = false;
/** @param {string} signal */
async function shutdown(signal) {
	if (closing) return;
	closing = true;
	console.log(`${signal}: closing`);
	const force = setTimeout(() => process.exit(0), 5000);
	force.unref();
	await realtime.close().catch(() => {});
	server.close(() => process.exit(0));
	server.closeAllConnections?.();
}
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));
