import { fail, redirect } from '@sveltejs/kit';
import { siteSchema } from '$lib/schemas/register';
import { parseForm } from '$lib/schemas/form';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as register from '$lib/server/db/register';
import { record } from '$lib/server/db/audit';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'register.read', url);
	const archived = url.searchParams.get('archived') === 'archived' ? 'archived' : 'live';
	const sites = await register.listSites(context().handle.db, viewer.organisationId, { archived, perPage: 200 });
	return { sites, archived, canWrite: can(viewer.role, 'register.write') };
};

export const actions: Actions = {
	create: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const form = parseForm(await request.formData(), siteSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const db = context().handle.db;
		const site = await register.createSite(db, viewer.organisationId, form.data);
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'site.created',
			subjectType: 'site',
			subjectId: site.id
		});
		redirect(303, `/register/sites/${site.id}`);
	}
};
