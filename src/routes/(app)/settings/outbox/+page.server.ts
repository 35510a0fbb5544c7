import { error } from '@sveltejs/kit';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { readCapturedMail } from '$lib/server/mail/fake-smtp';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'mail.outbox.read', url);
	const dir = context().config.mailCaptureDir;
	if (!dir) error(404, 'The outbox page is only there while the local test mail server is in use.');
	// The fake server sees every organisation's mail: show only what went to this organisation's
	// members and invitees.
	const db = context().handle.db;
	const [people, invited] = await Promise.all([
		db.selectFrom('member').innerJoin('app_user', 'app_user.id', 'member.user_id').select('app_user.email').where('member.organisation_id', '=', viewer.organisationId).execute(),
		db.selectFrom('invitation').select('email').where('organisation_id', '=', viewer.organisationId).execute()
	]);
	const mine = new Set([...people, ...invited].map((r) => r.email.toLowerCase()));
	const mail = readCapturedMail(dir)
		.filter((m) => m.to.some((t) => mine.has(t.toLowerCase())))
		.slice(0, 100);
	return { mail };
};
