import { error } from '@sveltejs/kit';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as members from '$lib/server/db/members';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const viewer = requirePage(locals, 'member.read', url);
	const db = context().handle.db;
	const member = await members.get(db, viewer.organisationId, params.id);
	if (!member) error(404, 'No such member in your organisation');
	const activity = can(viewer.role, 'audit.read')
		? await db
				.selectFrom('audit_event')
				.select(['action', 'created_at'])
				.where('organisation_id', '=', viewer.organisationId)
				.where('actor_user_id', '=', member.user_id)
				.orderBy('created_at', 'desc')
				.limit(20)
				.execute()
		: [];
	return { member: { id: member.id, name: member.name, email: member.email, role: member.role, since: member.created_at }, activity };
};
