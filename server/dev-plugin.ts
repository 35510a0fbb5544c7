import type { Plugin } from 'vite';

/** In `npm run dev`, attach socket.io to Vite's own HTTP server so the board works in dev. */
export function collabDevPlugin(): Plugin {
	return {
		name: 'spotface-realtime-dev',
		apply: 'serve',
		async configureServer(server) {
			if (process.env.SPOTFACE_DEV !== '1' || !server.httpServer) return;
			const { attachRealtime } = await import('./realtime');
			attachRealtime(server.httpServer as import('node:http').Server, {
				databaseUrl: process.env.DATABASE_URL!,
				origin: process.env.ORIGIN ?? 'http://127.0.0.1:5173'
			});
		}
	};
}
