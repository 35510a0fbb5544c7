import type { Cookies } from '@sveltejs/kit';
import { context } from '../context';
import * as members from '../db/members';
import type { Viewer } from './lucia';

export async function startSession(cookies: Cookies, userId: string, organisationId: string) {
	const { auth } = context();
	const session = await auth.createSession(userId, { organisation_id: organisationId });
	const cookie = auth.createSessionCookie(session.id);
	cookies.set(cookie.name, cookie.value, { path: '/', ...cookie.attributes, httpOnly: true });
}

export async function endSession(cookies: Cookies, sessionId: string) {
	const { auth } = context();
	await auth.invalidateSession(sessionId);
	const blank = auth.createBlankSessionCookie();
	cookies.set(blank.name, blank.value, { path: '/', ...blank.attributes, httpOnly: true });
}

/** Validate the cookie, renew it when lucia says so, and load the member's role. */
export async function loadViewer(cookies: Cookies): Promise<Viewer | null> {
	const { auth, handle } = context();
	const sessionId = cookies.get(auth.sessionCookieName);
	if (!sessionId) return null;
	const { session, user } = await auth.validateSession(sessionId);
	if (!session) {
		const blank = auth.createBlankSessionCookie();
		cookies.set(blank.name, blank.value, { path: '/', ...blank.attributes, httpOnly: true });
		return null;
	}
	if (session.fresh) {
		const c = auth.createSessionCookie(session.id);
		cookies.set(c.name, c.value, { path: '/', ...c.attributes, httpOnly: true });
	}
	const member = await members.findForUser(handle.db, session.organisationId, user.id);
	if (!member) {
		await endSession(cookies, session.id);
		return null;
	}
	return {
		userId: user.id,
		email: user.email,
		name: user.name,
		organisationId: session.organisationId,
		organisationName: member.organisation_name,
		role: member.role,
		sessionId: session.id
	};
}
