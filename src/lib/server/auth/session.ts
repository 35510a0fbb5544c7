import type { Cookies } from '@sveltejs/kit';
import { context } from '../context';
import { viewerFromSession } from './viewer';
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
	const found = await viewerFromSession(auth, handle.db, cookies.get(auth.sessionCookieName));
	if (!found.ok) {
		if (found.reason === 'expired') {
			const blank = auth.createBlankSessionCookie();
			cookies.set(blank.name, blank.value, { path: '/', ...blank.attributes, httpOnly: true });
		} else if (found.reason === 'not-a-member' && found.sessionId) {
			await endSession(cookies, found.sessionId);
		}
		return null;
	}
	if (found.fresh) {
		const c = auth.createSessionCookie(found.viewer.sessionId);
		cookies.set(c.name, c.value, { path: '/', ...c.attributes, httpOnly: true });
	}
	return found.viewer;
}
