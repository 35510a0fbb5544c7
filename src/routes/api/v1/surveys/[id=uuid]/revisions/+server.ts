import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as surveys from '$lib/server/db/surveys';
import { json, problem } from '$lib/server/http/problem';
import { listRevisions } from '$lib/server/review/revisions';
import type { RequestHandler } from './$types';

/** The survey's approved revisions, oldest first. */
export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'survey.read');
	if (v instanceof Response) return v;
	const db = context().handle.db;
	if (!(await surveys.get(db, v.organisationId, params.id))) return problem(404, 'No such survey in your organisation.');
	const rows = await listRevisions(db, v.organisationId, params.id);
	return json({
		items: rows.map((r) => ({
			number: r.number,
			approvedAt: new Date(r.approved_at).toISOString(),
			approvedBy: r.approved_by,
			approverName: r.approver_name,
			note: r.note,
			confirmedExceptions: r.confirmed_exceptions
		}))
	});
};
