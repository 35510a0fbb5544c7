import { MACHINE_FIELD_KEYS, machineUpdateSchema } from '$lib/schemas/register';
import { requireApi } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as machines from '$lib/server/db/machines';
import { json, problem, readJson } from '$lib/server/http/problem';
import { audit, errorResponse, isUuid, notFound } from '$lib/server/register/api';
import { item } from '$lib/server/register/crud';
import type { RequestHandler } from './$types';

const base = item({
	noun: 'machine',
	read: 'register.read',
	write: 'register.write',
	get: machines.getMachine,
	schema: machineUpdateSchema,
	update: machines.updateMachine,
	archive: machines.archiveMachine
});

export const GET = base.GET;
export const DELETE = base.DELETE;

/** Engineers and admins change anything; technicians change the field data they see on the walk. */
export const PATCH: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'register.field-edit');
	if (v instanceof Response) return v;
	if (!isUuid(params.id)) return notFound('machine');
	const body = await readJson(request, machineUpdateSchema);
	if (!body.ok) return body.response;
	const keys = Object.keys(body.data).filter((k) => (body.data as Record<string, unknown>)[k] !== undefined);
	if (!can(v.role, 'register.write')) {
		const outside = keys.filter((k) => !(MACHINE_FIELD_KEYS as string[]).includes(k));
		if (outside.length) {
			return problem(
				403,
				`Your role (${v.role}) may change a machine's field data only (speed, power, foundation, hazardous area, notes), not: ${outside.join(', ')}.`
			);
		}
	}
	const db = context().handle.db;
	try {
		const row = await machines.updateMachine(db, v.organisationId, params.id, body.data);
		if (!row) return notFound('machine');
		await audit(db, v, 'machine.updated', 'machine', params.id, { fields: keys });
		return json(row);
	} catch (e) {
		return errorResponse(e);
	}
};
