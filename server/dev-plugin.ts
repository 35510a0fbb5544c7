import type { Plugin } from 'vite';

/**
 * In `npm run dev`, attach socket.io to Vite's own HTTP server so the board works in dev. The
 * realtime module is loaded through Vite's SSR module graph, the same graph SvelteKit loads the
 * pages from, so the live board shares their database pool and lucia instance (context.ts).
 */
export function collabDevPlugin(): Plugin {
	return {
		name: 'spotface-realtime-dev',
		apply: 'serve',
		configureServer(server) {
			const http = server.httpServer as import('node:http').Server | null;
			if (process.env.SPOTFACE_DEV !== '1' || !http) return;
			http.once('listening', async () => {
				try {
					const mod = (await server.ssrLoadModule('/src/lib/server/realtime.ts')) as typeof import('../src/lib/server/realtime');
					mod.attachRealtime(http);
				} catch (e) {
					console.error('[realtime] the live board could not start in dev:', e);
				}
			});
		}
	};
}
