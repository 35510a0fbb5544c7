import { commentReplySchema } from '$lib/schemas/comment';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { json, problem, readJson } from '$lib/server/http/problem';
import { createComment, getComment } from '$lib/server/review/comments';
import { reviewError } from '$lib/server/review/api';
import type { RequestHandler } from './$types';

/** Replies to a comment (joins its thread). */
export const POST: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'comment.write');
	if (v instanceof Response) return v;
	const body = await readJson(request, commentReplySchema, 64_000);
	if (!body.ok) return body.response;
	const db = context().handle.db;
	const parent = await getComment(db, v.organisationId, params.id);
	if (!parent) return problem(404, 'No such comment in your organisation.');
	try {
		const c = await createComment(
			db,
			v.organisationId,
			{ userId: v.userId, name: v.name },
			{ surveyId: parent.survey_id, targetKind: parent.target_kind, parentId: parent.id, body: body.data.body },
			{ mailer: context().mailer, origin: context().config.origin }
		);
		return json(c, { status: 201, headers: { location: `/api/v1/comments/${c.id}` } });
	} catch (e) {
		return reviewError(e);
	}
};
