// SvelteKit-facing guards. They ask guard.ts; pages get redirects or error pages, the API gets
// problem+json.
import { error, redirect } from '@sveltejs/kit';
import { can, isReadAction, type Action } from './guard';
import type { Viewer } from './lucia';
import { problem } from '../http/problem';

export function requirePage(locals: App.Locals, action: Action, url?: URL): Viewer {
	const viewer = locals.viewer;
	if (!viewer) {
		const next = url ? `?next=${encodeURIComponent(url.pathname + url.search)}` : '';
		redirect(303, `/sign-in${next}`);
	}
	if (!can(viewer.role, action)) error(403, 'Your role does not allow this. Ask an admin of your organisation.');
	return viewer;
}

/** For API routes: the viewer, or a problem response to return as is. */
export function requireApi(locals: App.Locals, action: Action): Viewer | Response {
	const viewer = locals.viewer;
	if (!viewer) return problem(401, 'Sign in first.');
	if (!can(viewer.role, action)) return problem(403, `Your role (${viewer.role}) does not allow ${action}.`);
	if (viewer.token?.scope === 'read' && !isReadAction(action)) return problem(403, readOnlyTokenMessage);
	return viewer;
}

export const readOnlyTokenMessage = 'This token is read-only: it cannot change anything. Ask an admin for a read-and-write token.';
