import { commentCreateSchema, commentListQuerySchema } from '$lib/schemas/comment';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as surveys from '$lib/server/db/surveys';
import { fieldErrors, json, problem, readJson } from '$lib/server/http/problem';
import { createComment, listThreads } from '$lib/server/review/comments';
import { queryOf, reviewError } from '$lib/server/review/api';
import type { RequestHandler } from './$types';

/** Threads of the survey: all, or those of a board (?boardId=), a kind (?targetKind=) or an item (?targetId=). */
export const GET: RequestHandler = async ({ locals, params, url }) => {
	const v = requireApi(locals, 'survey.read');
	if (v instanceof Response) return v;
	const q = commentListQuerySchema.safeParse(queryOf(url));
	if (!q.success) return problem(400, 'Some query parameters are invalid.', { errors: fieldErrors(q.error) });
	const db = context().handle.db;
	if (!(await surveys.get(db, v.organisationId, params.id))) return problem(404, 'No such survey in your organisation.');
	return json({ items: await listThreads(db, v.organisationId, params.id, q.data) });
};

export const POST: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'comment.write');
	if (v instanceof Response) return v;
	const body = await readJson(request, commentCreateSchema, 64_000);
	if (!body.ok) return body.response;
	const { db, mailer, config } = { db: context().handle.db, mailer: context().mailer, config: context().config };
	try {
		const c = await createComment(
			db,
			v.organisationId,
			{ userId: v.userId, name: v.name },
			{ surveyId: params.id, ...body.data },
			{ mailer, origin: config.origin }
		);
		return json(c, { status: 201, headers: { location: `/api/v1/comments/${c.id}` } });
	} catch (e) {
		return reviewError(e);
	}
};
