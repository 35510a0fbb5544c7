import { commentEditSchema } from '$lib/schemas/comment';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { json, problem, readJson } from '$lib/server/http/problem';
import { editComment, getComment } from '$lib/server/review/comments';
import { reviewError } from '$lib/server/review/api';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'survey.read');
	if (v instanceof Response) return v;
	const c = await getComment(context().handle.db, v.organisationId, params.id);
	if (!c) return problem(404, 'No such comment in your organisation.');
	return json({
		id: c.id,
		surveyId: c.survey_id,
		targetKind: c.target_kind,
		boardId: c.board_id,
		targetId: c.target_id,
		parentId: c.parent_id,
		authorId: c.author_user_id,
		authorName: c.author_name,
		body: c.body,
		createdAt: new Date(c.created_at).toISOString(),
		editedAt: c.edited_at ? new Date(c.edited_at).toISOString() : null
	});
};

/** The author changes the body. */
export const PATCH: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'comment.write');
	if (v instanceof Response) return v;
	const body = await readJson(request, commentEditSchema, 64_000);
	if (!body.ok) return body.response;
	try {
		return json(
			await editComment(context().handle.db, v.organisationId, { userId: v.userId, name: v.name }, params.id, body.data.body, {
				mailer: context().mailer,
				origin: context().config.origin
			})
		);
	} catch (e) {
		return reviewError(e);
	}
};
