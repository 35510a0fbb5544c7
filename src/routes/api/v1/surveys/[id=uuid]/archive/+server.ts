import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { json, problem } from '$lib/server/http/problem';
import { archiveSurvey } from '$lib/server/review/workflow';
import { reviewError } from '$lib/server/review/api';
import type { RequestHandler } from './$types';

/** Archives the survey: it keeps its status and history; its boards turn read-only for everyone. */
export const POST: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'survey.archive');
	if (v instanceof Response) return v;
	try {
		const ok = await archiveSurvey(context().handle.db, v.organisationId, params.id, { userId: v.userId, role: v.role });
		if (!ok) return problem(404, 'No such live survey in your organisation.');
		return json({ id: params.id, archived: true });
	} catch (e) {
		return reviewError(e);
	}
};
