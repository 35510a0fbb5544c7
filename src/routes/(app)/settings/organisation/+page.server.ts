import { fail } from '@sveltejs/kit';
import { organisationUpdateSchema } from '$lib/schemas/auth';
import { parseForm } from '$lib/schemas/form';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as organisations from '$lib/server/db/organisations';
import { record } from '$lib/server/db/audit';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'organisation.read', url);
	const org = await organisations.get(context().handle.db, viewer.organisationId);
	return {
		organisation: { name: org!.name, createdAt: org!.created_at },
		canManage: can(viewer.role, 'organisation.manage'),
		canReadOutbox: can(viewer.role, 'mail.outbox.read'),
		canManageIntegration: can(viewer.role, 'integration.manage')
	};
};

export const actions: Actions = {
	default: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'organisation.manage', url);
		const form = parseForm(await request.formData(), organisationUpdateSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const db = context().handle.db;
		await organisations.update(db, viewer.organisationId, { name: form.data.name });
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'organisation.renamed',
			data: { name: form.data.name }
		});
		return { saved: true, values: form.values };
	}
};
