import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as outbox from '$lib/server/db/mail-outbox';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'mail.outbox.read', url);
	const rows = await outbox.listForOrganisation(context().handle.db, viewer.organisationId);
	return {
		mail: rows.map((m) => ({
			id: m.id,
			to: m.to_address,
			subject: m.subject,
			text: outbox.withoutPersonalLinks(m.body_text),
			status: m.status,
			error: m.error,
			createdAt: new Date(m.created_at).toISOString(),
			sentAt: m.sent_at ? new Date(m.sent_at).toISOString() : null
		}))
	};
};
