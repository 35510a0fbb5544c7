import { organisationUpdateSchema } from '$lib/schemas/auth';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as organisations from '$lib/server/db/organisations';
import { record } from '$lib/server/db/audit';
import { json, readJson } from '$lib/server/http/problem';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals }) => {
	const v = requireApi(locals, 'organisation.read');
	if (v instanceof Response) return v;
	const org = await organisations.get(context().handle.db, v.organisationId);
	return json({ id: org!.id, name: org!.name, createdAt: org!.created_at });
};

export const PATCH: RequestHandler = async ({ locals, request }) => {
	const v = requireApi(locals, 'organisation.manage');
	if (v instanceof Response) return v;
	const body = await readJson(request, organisationUpdateSchema);
	if (!body.ok) return body.response;
	const db = context().handle.db;
	const org = await organisations.update(db, v.organisationId, body.data);
	await record(db, { organisationId: v.organisationId, actorUserId: v.userId, action: 'organisation.renamed', data: body.data });
	return json({ id: org!.id, name: org!.name, createdAt: org!.created_at });
};
