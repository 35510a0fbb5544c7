import { revisionNumberSchema } from '$lib/schemas/review';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { json, problem } from '$lib/server/http/problem';
import { getRevision } from '$lib/server/review/revisions';
import type { RequestHandler } from './$types';

/** One revision with its boards, points, routes and zones as approved. */
export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'survey.read');
	if (v instanceof Response) return v;
	const n = revisionNumberSchema.safeParse(params.number);
	if (!n.success) return problem(404, 'No such revision of this survey.');
	const data = await getRevision(context().handle.db, v.organisationId, params.id, n.data);
	if (!data) return problem(404, 'No such revision of this survey.');
	return json(data);
};
