import { error, fail, redirect } from '@sveltejs/kit';
import { machineFieldSchema, machineSchema } from '$lib/schemas/register';
import { parseForm } from '$lib/schemas/form';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as register from '$lib/server/db/register';
import * as machines from '$lib/server/db/machines';
import { record } from '$lib/server/db/audit';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url, params }) => {
	const viewer = requirePage(locals, 'register.read', url);
	const db = context().handle.db;
	const machine = await machines.getMachine(db, viewer.organisationId, params.id);
	if (!machine) error(404, 'No such machine in your organisation.');
	const [sites, areas, supplyPoints] = await Promise.all([
		register.listSites(db, viewer.organisationId, { perPage: 500 }),
		register.listAreas(db, viewer.organisationId, { siteId: machine.siteId, perPage: 500 }),
		machine.areaId ? register.listSupplyPoints(db, viewer.organisationId, { areaId: machine.areaId }) : Promise.resolve(null)
	]);
	// An archived site stays selectable for the machine that already sits there.
	const siteList = sites.items.map((s) => ({ id: s.id, name: s.name }));
	if (!siteList.some((s) => s.id === machine.siteId)) siteList.push({ id: machine.siteId, name: machine.siteName });
	return {
		machine,
		sites: siteList,
		areas: areas.items.map((a) => ({ id: a.id, name: a.name, siteId: a.siteId })),
		supplyPoints: supplyPoints?.items ?? [],
		created: url.searchParams.has('created'),
		can: {
			write: can(viewer.role, 'register.write'),
			fieldEdit: can(viewer.role, 'register.field-edit'),
			upload: can(viewer.role, 'media.upload')
		},
		userId: viewer.userId
	};
};

export const actions: Actions = {
	save: async ({ locals, request, url, params }) => {
		const viewer = requirePage(locals, 'register.field-edit', url);
		const full = can(viewer.role, 'register.write');
		const form = parseForm(await request.formData(), full ? machineSchema : machineFieldSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const db = context().handle.db;
		try {
			const m = await machines.updateMachine(db, viewer.organisationId, params.id, form.data);
			if (!m) error(404, 'No such machine in your organisation.');
		} catch (e) {
			if (e instanceof register.RegisterError) return fail(e.status, { values: form.values, errors: { [e.field ?? 'name']: e.message } });
			throw e;
		}
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'machine.updated',
			subjectType: 'machine',
			subjectId: params.id
		});
		return { saved: true };
	},
	archive: async ({ locals, url, params }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const db = context().handle.db;
		if (!(await machines.archiveMachine(db, viewer.organisationId, params.id))) error(404, 'No such machine in your organisation.');
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'machine.archived',
			subjectType: 'machine',
			subjectId: params.id
		});
		redirect(303, `/register/machines/${params.id}`);
	},
	restore: async ({ locals, url, params }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const db = context().handle.db;
		try {
			if (!(await machines.restoreMachine(db, viewer.organisationId, params.id))) error(404, 'No such machine in your organisation.');
		} catch (e) {
			if (e instanceof register.RegisterError) return fail(e.status, { errors: { _: e.message } });
			throw e;
		}
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'machine.restored',
			subjectType: 'machine',
			subjectId: params.id
		});
		redirect(303, `/register/machines/${params.id}`);
	}
};
