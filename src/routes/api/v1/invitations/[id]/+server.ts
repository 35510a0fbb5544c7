import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as invitations from '$lib/server/db/invitations';
import { record } from '$lib/server/db/audit';
import { json, problem } from '$lib/server/http/problem';
import { match as isUuid } from '../../../../../params/uuid';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'member.invite');
	if (v instanceof Response) return v;
	const inv = isUuid(params.id) ? await invitations.get(context().handle.db, v.organisationId, params.id) : undefined;
	if (!inv) return problem(404, 'No such invitation in your organisation.');
	return json(inv);
};

export const DELETE: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'member.invite');
	if (v instanceof Response) return v;
	const db = context().handle.db;
	if (!isUuid(params.id) || !(await invitations.revoke(db, v.organisationId, params.id))) {
		return problem(404, 'No such open invitation in your organisation.');
	}
	await record(db, {
		organisationId: v.organisationId,
		actorUserId: v.userId,
		action: 'invitation.revoked',
		subjectType: 'invitation',
		subjectId: params.id
	});
	return new Response(null, { status: 204 });
};
