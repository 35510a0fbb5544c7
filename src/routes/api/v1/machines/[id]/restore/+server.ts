import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as machines from '$lib/server/db/machines';
import { json } from '$lib/server/http/problem';
import { audit, errorResponse, isUuid, notFound } from '$lib/server/register/api';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'register.write');
	if (v instanceof Response) return v;
	if (!isUuid(params.id)) return notFound('machine');
	const db = context().handle.db;
	try {
		const row = await machines.restoreMachine(db, v.organisationId, params.id);
		if (!row) return notFound('machine');
		await audit(db, v, 'machine.restored', 'machine', params.id);
		return json(row);
	} catch (e) {
		return errorResponse(e);
	}
};
