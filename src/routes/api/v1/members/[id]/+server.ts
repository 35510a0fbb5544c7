import { memberRoleSchema } from '$lib/schemas/auth';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as members from '$lib/server/db/members';
import { record } from '$lib/server/db/audit';
import { json, problem, readJson } from '$lib/server/http/problem';
import { match as isUuid } from '../../../../../params/uuid';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'member.read');
	if (v instanceof Response) return v;
	const m = isUuid(params.id) ? await members.get(context().handle.db, v.organisationId, params.id) : undefined;
	if (!m) return problem(404, 'No such member in your organisation.');
	return json({ id: m.id, name: m.name, email: m.email, role: m.role, createdAt: m.created_at });
};

export const PATCH: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'member.change-role');
	if (v instanceof Response) return v;
	const body = await readJson(request, memberRoleSchema);
	if (!body.ok) return body.response;
	if (!isUuid(params.id)) return problem(404, 'No such member in your organisation.');
	const db = context().handle.db;
	try {
		const m = await members.changeRole(db, v.organisationId, params.id, body.data.role);
		if (!m) return problem(404, 'No such member in your organisation.');
	} catch (e) {
		if (e instanceof members.LastAdminError) return problem(409, e.message);
		throw e;
	}
	await record(db, {
		organisationId: v.organisationId,
		actorUserId: v.userId,
		action: 'member.role-changed',
		subjectType: 'member',
		subjectId: params.id,
		data: body.data
	});
	const m = await members.get(db, v.organisationId, params.id);
	return json({ id: m!.id, name: m!.name, email: m!.email, role: m!.role });
};

export const DELETE: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'member.remove');
	if (v instanceof Response) return v;
	if (!isUuid(params.id)) return problem(404, 'No such member in your organisation.');
	const db = context().handle.db;
	try {
		const m = await members.remove(db, v.organisationId, params.id);
		if (!m) return problem(404, 'No such member in your organisation.');
	} catch (e) {
		if (e instanceof members.LastAdminError) return problem(409, e.message);
		throw e;
	}
	await record(db, {
		organisationId: v.organisationId,
		actorUserId: v.userId,
		action: 'member.removed',
		subjectType: 'member',
		subjectId: params.id
	});
	return new Response(null, { status: 204 });
};
