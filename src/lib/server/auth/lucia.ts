// The session layer. lucia v3 is kept behind this module so it can be replaced without
// touching routes, hooks or the socket handshake.
import { Lucia, TimeSpan } from 'lucia';
import { NodePostgresAdapter } from '@lucia-auth/adapter-postgresql';
import type pg from 'pg';
import type { Role } from '../db/types';

export const SESSION_COOKIE = 'spotface_session';

export function createAuth(pool: pg.Pool, opts: { secure: boolean; sessionDays?: number }) {
	const adapter = new NodePostgresAdapter(pool, { user: 'app_user', session: 'user_session' });
	return new Lucia(adapter, {
		sessionExpiresIn: new TimeSpan(opts.sessionDays ?? 30, 'd'),
		sessionCookie: {
			name: SESSION_COOKIE,
			attributes: { secure: opts.secure, sameSite: 'lax' }
		},
		getSessionAttributes: (a) => ({ organisationId: a.organisation_id }),
		getUserAttributes: (a) => ({ email: a.email, name: a.name, unitSystem: a.unit_system === 'us' ? ('us' as const) : ('metric' as const) })
	});
}

export type Auth = ReturnType<typeof createAuth>;

declare module 'lucia' {
	interface Register {
		Lucia: ReturnType<typeof createAuth>;
		DatabaseSessionAttributes: { organisation_id: string };
		DatabaseUserAttributes: { email: string; name: string; unit_system?: string };
	}
}

export interface Viewer {
	userId: string;
	email: string;
	name: string;
	organisationId: string;
	organisationName: string;
	role: Role;
	/** The session's id; '' for a request authorised by an API token. */
	sessionId: string;
	/** How this person reads and types measurements (stored values are SI). */
	unitSystem: 'metric' | 'us';
	/** Set when an API token (Authorization: Bearer) authorised the request. */
	token?: { id: string; scope: 'read' | 'read_write'; kind: 'person' | 'service' };
}

/** Parse the session cookie out of a raw Cookie header (used by the socket handshake). */
export function sessionIdFromCookieHeader(auth: Auth, header: string | undefined): string | null {
	return auth.readSessionCookie(header ?? '');
}
