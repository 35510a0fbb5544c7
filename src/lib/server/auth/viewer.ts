// Who is behind a session: the one lookup shared by page requests and the socket handshake.
import type { DB } from '../db/index';
import * as members from '../db/members';
import type { Auth, Viewer } from './lucia';

export type ViewerLookup =
	{ ok: true; viewer: Viewer; fresh: boolean } | { ok: false; reason: 'no-session' | 'expired' | 'not-a-member'; sessionId?: string };

export async function viewerFromSession(auth: Auth, db: DB, sessionId: string | null | undefined): Promise<ViewerLookup> {
	if (!sessionId) return { ok: false, reason: 'no-session' };
	const { session, user } = await auth.validateSession(sessionId);
	if (!session) return { ok: false, reason: 'expired' };
	const member = await members.findForUser(db, session.organisationId, user.id);
	if (!member) return { ok: false, reason: 'not-a-member', sessionId: session.id };
	return {
		ok: true,
		fresh: session.fresh,
		viewer: {
			userId: user.id,
			email: user.email,
			name: user.name,
			organisationId: session.organisationId,
			organisationName: member.organisation_name,
			role: member.role,
			sessionId: session.id,
			unitSystem: user.unitSystem
		}
	};
}
