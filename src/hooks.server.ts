import { sequence } from '@sveltejs/kit/hooks';
import type { Handle, HandleServerError, ServerInit } from '@sveltejs/kit';
import { loadViewer } from '$lib/server/auth/session';
import { context } from '$lib/server/context';
import { publishRealtime } from '$lib/server/realtime';

// The production entry (server/index.js) attaches socket.io to its HTTP server with the function
// published here, so the live board shares this build's database pool and lucia instance.
export const init: ServerInit = () => {
	publishRealtime();
};

const authenticate: Handle = async ({ event, resolve }) => {
	event.locals.viewer = await loadViewer(event.cookies);
	return resolve(event);
};

const securityHeaders: Handle = async ({ event, resolve }) => {
	const response = await resolve(event);
	const h = response.headers;
	h.set('X-Content-Type-Options', 'nosniff');
	h.set('Referrer-Policy', 'strict-origin-when-cross-origin');
	h.set('X-Frame-Options', 'DENY');
	h.set('Permissions-Policy', 'camera=(self), geolocation=(), microphone=()');
	h.set('Cross-Origin-Opener-Policy', 'same-origin');
	if (context().config.origin.startsWith('https:')) {
		h.set('Strict-Transport-Security', 'max-age=31536000; includeSubDomains');
	}
	// API responses carry no CSP of their own from SvelteKit; give them a strict one.
	if (event.url.pathname.startsWith('/api/') && !h.has('Content-Security-Policy')) {
		h.set('Content-Security-Policy', "default-src 'none'; frame-ancestors 'none'");
	}
	return response;
};

export const handle = sequence(securityHeaders, authenticate);

export const handleError: HandleServerError = ({ error, event, status }) => {
	if (status !== 404) console.error(`[error] ${event.request.method} ${event.url.pathname}:`, error);
	return {
		message: status === 404 ? 'Not found' : 'Something went wrong on the server. Try again; if it keeps happening, tell your admin.'
	};
};
