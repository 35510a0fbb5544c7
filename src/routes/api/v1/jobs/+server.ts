import { changesQuerySchema } from '$lib/schemas/integration';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { fieldErrors, json, problem } from '$lib/server/http/problem';
import { CursorError } from '$lib/server/integration/feed';
import { jobsSince } from '$lib/server/integration/job-feed';
import type { RequestHandler } from './$types';

/** Installation jobs changed since a time (issued, recorded on, closed), oldest change first, a page at a time. */
export const GET: RequestHandler = async ({ locals, url }) => {
	const v = requireApi(locals, 'job.read');
	if (v instanceof Response) return v;
	const q = changesQuerySchema.safeParse(Object.fromEntries(url.searchParams));
	if (!q.success) return problem(400, 'Some query parameters are invalid.', { errors: fieldErrors(q.error), title: 'Invalid input' });
	try {
		return json(await jobsSince(context().handle.db, v.organisationId, q.data));
	} catch (e) {
		if (e instanceof CursorError) return problem(400, e.message, { errors: { cursor: [e.message] } });
		throw e;
	}
};
