// Small helpers shared by the register's API routes: ids, errors and the audit trail.
import { problem } from '../http/problem';
import { RegisterError } from '../db/register';
import { MediaError } from '../media/process';
import { record } from '../db/audit';
import type { DB } from '../db/index';
import type { Viewer } from '../auth/lucia';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
export const isUuid = (v: string | undefined): v is string => !!v && UUID.test(v);

export const NOUN = {
	site: 'site',
	area: 'area',
	supply_point: 'supply point',
	machine: 'machine',
	bearing: 'bearing',
	media: 'photo or drawing'
} as const;

export function notFound(noun: keyof typeof NOUN) {
	return problem(404, `No such ${NOUN[noun]} in your organisation.`);
}

/** Known errors become problem+json; anything else is rethrown (500 with a logged cause). */
export function errorResponse(e: unknown): Response {
	if (e instanceof RegisterError)
		return problem(e.status, e.message, { errors: e.errors, title: e.status === 400 ? 'Invalid input' : undefined });
	if (e instanceof MediaError) return problem(e.status, e.message, { title: e.status === 422 ? 'File refused' : undefined });
	throw e;
}

export async function audit(
	db: DB,
	v: Viewer,
	action: string,
	subjectType: keyof typeof NOUN,
	subjectId: string,
	data?: Record<string, unknown>
) {
	await record(db, { organisationId: v.organisationId, actorUserId: v.userId, action, subjectType, subjectId, data });
}
