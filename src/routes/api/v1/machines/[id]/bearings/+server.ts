import { bearingSchema, pageQuerySchema, queryObject } from '$lib/schemas/register';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as machines from '$lib/server/db/machines';
import { json, readJson } from '$lib/server/http/problem';
import { audit, errorResponse, isUuid, notFound } from '$lib/server/register/api';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals, params, url }) => {
	const v = requireApi(locals, 'register.read');
	if (v instanceof Response) return v;
	const db = context().handle.db;
	if (!isUuid(params.id) || !(await machines.getMachine(db, v.organisationId, params.id))) return notFound('machine');
	const q = pageQuerySchema.parse(queryObject(url));
	return json(await machines.listBearings(db, v.organisationId, params.id, { archived: q.archived, page: q.page, perPage: q.perPage }));
};

export const POST: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'register.field-edit');
	if (v instanceof Response) return v;
	if (!isUuid(params.id)) return notFound('machine');
	const body = await readJson(request, bearingSchema);
	if (!body.ok) return body.response;
	const db = context().handle.db;
	try {
		const b = await machines.createBearing(db, v.organisationId, params.id, body.data);
		await audit(db, v, 'bearing.created', 'bearing', b.id, { machineId: params.id });
		return json(b, { status: 201, headers: { location: `/api/v1/bearings/${b.id}` } });
	} catch (e) {
		return errorResponse(e);
	}
};
