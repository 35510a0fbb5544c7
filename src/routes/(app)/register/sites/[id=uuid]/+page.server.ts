import { error, fail, redirect } from '@sveltejs/kit';
import { areaSchema, siteSchema, supplyPointSchema } from '$lib/schemas/register';
import { parseForm } from '$lib/schemas/form';
import { rowRefSchema } from '$lib/schemas/ids';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as register from '$lib/server/db/register';
import { record } from '$lib/server/db/audit';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url, params }) => {
	const viewer = requirePage(locals, 'register.read', url);
	const db = context().handle.db;
	const site = await register.getSite(db, viewer.organisationId, params.id);
	if (!site) error(404, 'No such site in your organisation.');
	const [areas, supplyPoints] = await Promise.all([
		register.listAreas(db, viewer.organisationId, { siteId: site.id, perPage: 200 }),
		register.listSupplyPoints(db, viewer.organisationId, { siteId: site.id, perPage: 200 })
	]);
	return { site, areas: areas.items, supplyPoints: supplyPoints.items, canWrite: can(viewer.role, 'register.write') };
};

async function audit(locals: App.Locals, action: string, subjectType: string, subjectId: string) {
	const v = locals.viewer!;
	await record(context().handle.db, { organisationId: v.organisationId, actorUserId: v.userId, action, subjectType, subjectId });
}

const areaRef = rowRefSchema('This area could not be identified: reload the page and try again.');
const supplyPointRef = rowRefSchema('This supply point could not be identified: reload the page and try again.');

export const actions: Actions = {
	save: async ({ locals, request, url, params }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const form = parseForm(await request.formData(), siteSchema);
		if (!form.ok) return fail(400, { action: 'save', values: form.values, errors: form.errors });
		const site = await register.updateSite(context().handle.db, viewer.organisationId, params.id, form.data);
		if (!site) error(404, 'No such site in your organisation.');
		await audit(locals, 'site.updated', 'site', params.id);
		return { action: 'save', saved: true };
	},
	archive: async ({ locals, url, params }) => {
		const viewer = requirePage(locals, 'register.write', url);
		if (!(await register.archiveSite(context().handle.db, viewer.organisationId, params.id)))
			error(404, 'No such site in your organisation.');
		await audit(locals, 'site.archived', 'site', params.id);
		redirect(303, '/register');
	},
	addArea: async ({ locals, request, url, params }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const data = await request.formData();
		data.set('siteId', params.id);
		const form = parseForm(data, areaSchema);
		if (!form.ok) return fail(400, { action: 'addArea', values: form.values, errors: form.errors });
		try {
			const a = await register.createArea(context().handle.db, viewer.organisationId, form.data);
			await audit(locals, 'area.created', 'area', a.id);
		} catch (e) {
			if (e instanceof register.RegisterError)
				return fail(e.status, { action: 'addArea', values: form.values, errors: { name: e.message } });
			throw e;
		}
		return { action: 'addArea', saved: true };
	},
	archiveArea: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const ref = parseForm(await request.formData(), areaRef);
		if (!ref.ok) return fail(400, { action: 'archiveArea', errors: { _: ref.errors.id } });
		const { id } = ref.data;
		if (!(await register.archiveArea(context().handle.db, viewer.organisationId, id))) error(404, 'No such area');
		await audit(locals, 'area.archived', 'area', id);
		return { action: 'archiveArea', saved: true };
	},
	addSupplyPoint: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const form = parseForm(await request.formData(), supplyPointSchema);
		if (!form.ok) return fail(400, { action: 'addSupplyPoint', values: form.values, errors: form.errors });
		try {
			const p = await register.createSupplyPoint(context().handle.db, viewer.organisationId, form.data);
			await audit(locals, 'supply_point.created', 'supply_point', p.id);
		} catch (e) {
			if (e instanceof register.RegisterError)
				return fail(e.status, { action: 'addSupplyPoint', values: form.values, errors: { areaId: e.message } });
			throw e;
		}
		return { action: 'addSupplyPoint', saved: true };
	},
	archiveSupplyPoint: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'register.write', url);
		const ref = parseForm(await request.formData(), supplyPointRef);
		if (!ref.ok) return fail(400, { action: 'archiveSupplyPoint', errors: { _: ref.errors.id } });
		const { id } = ref.data;
		if (!(await register.archiveSupplyPoint(context().handle.db, viewer.organisationId, id))) error(404, 'No such supply point');
		await audit(locals, 'supply_point.archived', 'supply_point', id);
		return { action: 'archiveSupplyPoint', saved: true };
	}
};
