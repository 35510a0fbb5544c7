import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'organisation.read', url);
	const db = context().handle.db;
	const [memberCount, openInvitations] = await Promise.all([
		db
			.selectFrom('member')
			.select((eb) => eb.fn.countAll<string>().as('n'))
			.where('organisation_id', '=', viewer.organisationId)
			.executeTakeFirstOrThrow(),
		can(viewer.role, 'member.invite')
			? db
					.selectFrom('invitation')
					.select((eb) => eb.fn.countAll<string>().as('n'))
					.where('organisation_id', '=', viewer.organisationId)
					.where('accepted_at', 'is', null)
					.where('revoked_at', 'is', null)
					.where('expires_at', '>', new Date())
					.executeTakeFirstOrThrow()
			: Promise.resolve({ n: '0' })
	]);
	return {
		welcome: url.searchParams.has('welcome'),
		joined: url.searchParams.has('joined'),
		members: Number(memberCount.n),
		openInvitations: Number(openInvitations.n),
		canInvite: can(viewer.role, 'member.invite')
	};
};
