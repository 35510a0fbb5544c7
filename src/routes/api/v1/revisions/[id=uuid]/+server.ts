import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { json, problem } from '$lib/server/http/problem';
import { revisionDetail } from '$lib/server/integration/feed';
import type { RequestHandler } from './$types';

/** One approved revision with its boards and points as approved (findings included). */
export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'survey.read');
	if (v instanceof Response) return v;
	const r = await revisionDetail(context().handle.db, v.organisationId, params.id);
	return r ? json(r) : problem(404, 'No such revision in your organisation.');
};
