import { invitationCreateSchema } from '$lib/schemas/auth';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as invitations from '$lib/server/db/invitations';
import { AccountError, invite } from '$lib/server/auth/accounts';
import { json, problem, readJson } from '$lib/server/http/problem';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals }) => {
	const v = requireApi(locals, 'member.invite');
	if (v instanceof Response) return v;
	return json({ items: await invitations.listOpen(context().handle.db, v.organisationId) });
};

export const POST: RequestHandler = async ({ locals, request }) => {
	const v = requireApi(locals, 'member.invite');
	if (v instanceof Response) return v;
	const body = await readJson(request, invitationCreateSchema);
	if (!body.ok) return body.response;
	const { handle, mailer, config, throttle } = context();
	const limit = await throttle.request('invite', { organisation: v.organisationId });
	if (!limit.ok) {
		return problem(429, 'Too many invitations from this organisation. Wait a while and try again.', {
			headers: { 'retry-after': String(limit.retryAfterSec) }
		});
	}
	try {
		const inv = await invite(handle.db, mailer, config.origin, {
			organisationId: v.organisationId,
			organisationName: v.organisationName,
			invitedBy: { id: v.userId, name: v.name },
			...body.data
		});
		return json(inv, { status: 201 });
	} catch (e) {
		if (e instanceof AccountError) return problem(e.status, e.message, { errors: e.field ? { [e.field]: [e.message] } : undefined });
		throw e;
	}
};
