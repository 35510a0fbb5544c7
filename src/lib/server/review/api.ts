// Shared pieces of the review API routes: turning the services' errors into problem+json.
import { problem } from '../http/problem';
import { CommentError } from './comments';
import { WorkflowError } from './workflow';

export function reviewError(e: unknown): Response {
	if (e instanceof WorkflowError) {
		if (e.exceptions?.length) {
			return new Response(
				JSON.stringify({ type: 'about:blank', title: 'Confirmation needed', status: 409, detail: e.message, exceptions: e.exceptions }),
				{ status: 409, headers: { 'content-type': 'application/problem+json' } }
			);
		}
		return problem(e.status, e.message);
	}
	if (e instanceof CommentError) return problem(e.status, e.message, e.field ? { errors: { [e.field]: [e.message] } } : {});
	throw e;
}

/** Reads a query string with a zod schema; a problem response when it does not parse. */
export function queryOf(url: URL): Record<string, string> {
	return Object.fromEntries(url.searchParams.entries());
}
