import { sequence } from '@sveltejs/kit/hooks';
import type { Handle, HandleServerError, ServerInit } from '@sveltejs/kit';
import { loadViewer } from '$lib/server/auth/session';
import { context } from '$lib/server/context';
import { publishRealtime } from '$lib/server/realtime';
import { viewerFromAuthorization } from '$lib/server/auth/api-tokens';
import { readOnlyTokenMessage } from '$lib/server/auth/require';
import { problem } from '$lib/server/http/problem';
import { beginIdempotent, IDEMPOTENCY_HEADER } from '$lib/server/integration/idempotency';
import { startQueue } from '$lib/server/queue/workers';

// The production entry (server/index.js) attaches socket.io to its HTTP server with the function
// published here, so the live board shares this build's database pool and lucia instance.
export const init: ServerInit = () => {
	publishRealtime();
	startQueue();
};

const UNSAFE = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);
const FORM_TYPES = ['application/x-www-form-urlencoded', 'multipart/form-data', 'text/plain', 'application/x-sveltekit-formdata'];

/** A request to the JSON API that carries an API token: authorised by the header, never by a cookie. */
function isTokenRequest(request: Request, url: URL): boolean {
	return url.pathname.startsWith('/api/v1/') && request.headers.has('authorization');
}

/**
 * Cross-site request check (SvelteKit's own is turned off in svelte.config.js so that API
 * tokens, which no browser sends by itself, need no Origin). For everything else it is
 * SvelteKit's rule: a form-type POST/PUT/PATCH/DELETE must come from our origin; and any
 * unsafe request whose Origin header names another site is refused as well.
 */
const csrf: Handle = async ({ event, resolve }) => {
	const { request, url } = event;
	if (UNSAFE.has(request.method) && !isTokenRequest(request, url)) {
		const origin = request.headers.get('origin');
		const type = (request.headers.get('content-type') ?? '').split(';')[0].trim().toLowerCase();
		const formType = FORM_TYPES.includes(type);
		if (origin !== url.origin && (formType || origin !== null)) {
			const message = `Cross-site ${request.method} form submissions are forbidden`;
			if (url.pathname.startsWith('/api/')) return problem(403, message);
			return new Response(message, { status: 403, headers: { 'content-type': 'text/plain' } });
		}
	}
	return resolve(event);
};

const authenticate: Handle = async ({ event, resolve }) => {
	if (isTokenRequest(event.request, event.url)) {
		const found = await viewerFromAuthorization(context().handle.db, event.request.headers.get('authorization') ?? '');
		if (!found.ok) {
			return problem(401, found.message, {
				title: 'Token refused',
				headers: { 'www-authenticate': `Bearer realm="spotface", error="invalid_token"` }
			});
		}
		if (found.viewer.token.scope === 'read' && UNSAFE.has(event.request.method)) return problem(403, readOnlyTokenMessage);
		event.locals.viewer = found.viewer;
		return resolve(event);
	}
	event.locals.viewer = await loadViewer(event.cookies);
	return resolve(event);
};

/** Idempotency-Key on every POST under /api/v1 (see src/lib/server/integration/idempotency.ts). */
const idempotency: Handle = async ({ event, resolve }) => {
	const key = event.request.headers.get(IDEMPOTENCY_HEADER);
	const v = event.locals.viewer;
	if (key === null || event.request.method !== 'POST' || !event.url.pathname.startsWith('/api/v1/') || !v) return resolve(event);
	const body = new Uint8Array(await event.request.clone().arrayBuffer());
	const begun = await beginIdempotent(context().handle.db, v.organisationId, key, {
		method: event.request.method,
		path: event.url.pathname,
		search: event.url.search,
		contentType: event.request.headers.get('content-type') ?? '',
		body
	});
	if (begun.kind === 'answer') return begun.response;
	let response: Response;
	try {
		response = await resolve(event);
	} catch (e) {
		await begun.abandon();
		throw e;
	}
	return begun.finish(response);
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

export const handle = sequence(securityHeaders, csrf, authenticate, idempotency);

export const handleError: HandleServerError = ({ error, event, status }) => {
	if (status !== 404) console.error(`[error] ${event.request.method} ${event.url.pathname}:`, error);
	return {
		message: status === 404 ? 'Not found' : 'Something went wrong on the server. Try again; if it keeps happening, tell your admin.'
	};
};
