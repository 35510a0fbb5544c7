// socket.io on the same HTTP server as the app. The handshake requires a valid session; the
// live board (src/lib/server/collab) builds on the authenticated socket.
import type { Server as HttpServer } from 'node:http';
import { Server } from 'socket.io';
import { createDb } from '../src/lib/server/db/index';
import { createAuth } from '../src/lib/server/auth/lucia';
import * as members from '../src/lib/server/db/members';
import type { Viewer } from '../src/lib/server/auth/lucia';

export interface RealtimeOptions {
	databaseUrl: string;
	origin: string;
}

export function attachRealtime(httpServer: HttpServer, opts: RealtimeOptions) {
	const handle = createDb(opts.databaseUrl, 10);
	const auth = createAuth(handle.pool, { secure: opts.origin.startsWith('https:') });
	const io = new Server(httpServer, {
		path: '/socket.io',
		serveClient: false,
		maxHttpBufferSize: 2_000_000,
		cors: { origin: opts.origin, credentials: true }
	});

	io.use(async (socket, next) => {
		try {
			const sessionId = auth.readSessionCookie(socket.handshake.headers.cookie ?? '');
			if (!sessionId) return next(new Error('unauthorised: sign in first'));
			const { session, user } = await auth.validateSession(sessionId);
			if (!session) return next(new Error('unauthorised: session expired'));
			const member = await members.findForUser(handle.db, session.organisationId, user.id);
			if (!member) return next(new Error('unauthorised: not a member'));
			const viewer: Viewer = {
				userId: user.id,
				email: user.email,
				name: user.name,
				organisationId: session.organisationId,
				organisationName: member.organisation_name,
				role: member.role,
				sessionId: session.id
			};
			socket.data.viewer = viewer;
			next();
		} catch (err) {
			console.error('[realtime] handshake failed:', (err as Error).message);
			next(new Error('unauthorised'));
		}
	});

	io.on('connection', (socket) => {
		socket.emit('hello', { name: (socket.data.viewer as Viewer).name, role: (socket.data.viewer as Viewer).role });
	});

	return {
		io,
		db: handle.db,
		async close() {
			await new Promise<void>((resolve) => io.close(() => resolve()));
			await handle.close();
		}
	};
}
