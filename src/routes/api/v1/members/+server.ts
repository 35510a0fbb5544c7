import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as members from '$lib/server/db/members';
import { json } from '$lib/server/http/problem';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals }) => {
	const v = requireApi(locals, 'member.read');
	if (v instanceof Response) return v;
	const rows = await members.list(context().handle.db, v.organisationId);
	return json({ items: rows.map((m) => ({ id: m.id, name: m.name, email: m.email, role: m.role, createdAt: m.created_at })) });
};
