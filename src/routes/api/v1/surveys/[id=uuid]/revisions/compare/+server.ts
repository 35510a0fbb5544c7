import { compareQuerySchema } from '$lib/schemas/review';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { fieldErrors, json, problem } from '$lib/server/http/problem';
import { compareStored } from '$lib/server/review/revisions';
import { queryOf } from '$lib/server/review/api';
import type { RequestHandler } from './$types';

/** ?from=1&to=2: points and routes added, removed, moved and changed between two revisions. */
export const GET: RequestHandler = async ({ locals, params, url }) => {
	const v = requireApi(locals, 'survey.read');
	if (v instanceof Response) return v;
	const q = compareQuerySchema.safeParse(queryOf(url));
	if (!q.success) return problem(400, 'Give two revision numbers: ?from=1&to=2.', { errors: fieldErrors(q.error) });
	const diff = await compareStored(context().handle.db, v.organisationId, params.id, q.data.from, q.data.to);
	if (!diff) return problem(404, 'No such revision of this survey.');
	return json(diff);
};
