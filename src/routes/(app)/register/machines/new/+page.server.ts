import { fail, redirect } from '@sveltejs/kit';
import { machineSchema } from '$lib/schemas/register';
import { parseForm } from '$lib/schemas/form';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as register from '$lib/server/db/register';
import * as machines from '$lib/server/db/machines';
import { record } from '$lib/server/db/audit';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'register.write', url);
	const db = context().handle.db;
	const [sites, areas] = await Promise.all([
		register.listSites(db, viewer.organisationId, { perPage: 500 }),
		register.listAreas(db, viewer.organisationId, { perPage: 2000 })
	]);
	return {
		sites: sites.items.map((s) => ({ id: s.id, name: s.name })),
		areas: areas.items.map((a) => ({ id: a.id, name: a.name, siteId: a.siteId })),
		siteId: url.searchParams.get('siteId') ?? ''
	};
};

export const actions: Actions = {
	default: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const form = parseForm(await request.formData(), machineSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const db = context().handle.db;
		let id: string;
		try {
			id = (await machines.createMachine(db, viewer.organisationId, form.data)).id;
		} catch (e) {
			if (e instanceof register.RegisterError) return fail(e.status, { values: form.values, errors: { [e.field ?? 'name']: e.message } });
			throw e;
		}
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'machine.created',
			subjectType: 'machine',
			subjectId: id
		});
		redirect(303, `/register/machines/${id}?created=1`);
	}
};
