import { machineListQuerySchema, queryObject } from '$lib/schemas/register';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as register from '$lib/server/db/register';
import * as machines from '$lib/server/db/machines';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'register.read', url);
	const db = context().handle.db;
	const query = machineListQuerySchema.parse(queryObject(url));
	const [list, sites, areas, anyMachine] = await Promise.all([
		machines.listMachines(db, viewer.organisationId, query),
		register.listSites(db, viewer.organisationId, { perPage: 500 }),
		query.siteId ? register.listAreas(db, viewer.organisationId, { siteId: query.siteId, perPage: 500 }) : Promise.resolve(null),
		db.selectFrom('machine').select('id').where('organisation_id', '=', viewer.organisationId).limit(1).executeTakeFirst()
	]);
	return {
		list,
		query,
		sites: sites.items.map((s) => ({ id: s.id, name: s.name })),
		areas: areas?.items.map((a) => ({ id: a.id, name: a.name })) ?? [],
		registerEmpty: !anyMachine,
		canWrite: can(viewer.role, 'register.write')
	};
};
