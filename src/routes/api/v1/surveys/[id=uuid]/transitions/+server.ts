import { transitionSchema } from '$lib/schemas/review';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as surveys from '$lib/server/db/surveys';
import { json, problem, readJson } from '$lib/server/http/problem';
import { listTransitions, transitionSurvey } from '$lib/server/review/workflow';
import { reviewError } from '$lib/server/review/api';
import type { RequestHandler } from './$types';

/** The survey's history of moves, oldest first. */
export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'survey.read');
	if (v instanceof Response) return v;
	const db = context().handle.db;
	if (!(await surveys.get(db, v.organisationId, params.id))) return problem(404, 'No such survey in your organisation.');
	const rows = await listTransitions(db, v.organisationId, params.id);
	return json({
		items: rows.map((r) => ({
			id: r.id,
			transition: r.transition,
			from: r.from_status,
			to: r.to_status,
			actorId: r.actor_user_id,
			actorName: r.actor_name,
			actorRole: r.actor_role,
			note: r.note,
			at: new Date(r.created_at).toISOString()
		}))
	});
};

/**
 * Moves the survey: { transition, note?, confirmExceptions? }. 403 when the role may not, 409 from
 * a state where it makes no sense (or, approving, with `exceptions` to confirm), 400 without a
 * required note.
 */
export const POST: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'survey.read');
	if (v instanceof Response) return v;
	const body = await readJson(request, transitionSchema);
	if (!body.ok) return body.response;
	try {
		const r = await transitionSurvey(context().handle.db, {
			organisationId: v.organisationId,
			surveyId: params.id,
			name: body.data.transition,
			actor: { userId: v.userId, role: v.role },
			note: body.data.note,
			confirmExceptions: body.data.confirmExceptions
		});
		return json({ id: r.id, from: r.from, to: r.to, transitionId: r.transitionId, revision: r.revision });
	} catch (e) {
		return reviewError(e);
	}
};
