// Sites, areas and 24 V DC supply points. Every function takes the organisation id; rows of
// another organisation are simply not found. Nothing is deleted: archive sets archived_at, and
// archived rows stay readable by id because surveys refer to them.
import { sql, type SelectQueryBuilder } from 'kysely';
import type { DB } from './index';
import type { Area, Database, Site, SupplyPoint } from './types';
import type { AreaInput, SiteInput, SupplyPointInput } from '../../schemas/register';

/** A rule of the register that input broke, with the field it belongs to (400/404/409). */
export class RegisterError extends Error {
	constructor(
		readonly status: 400 | 404 | 409,
		message: string,
		readonly field?: string
	) {
		super(message);
	}
	get errors(): Record<string, string[]> | undefined {
		return this.field ? { [this.field]: [this.message] } : undefined;
	}
}

export interface Page<T> {
	items: T[];
	total: number;
	page: number;
	perPage: number;
	pages: number;
}

export function pageOf<T>(items: T[], total: number, page: number, perPage: number): Page<T> {
	return { items, total, page, perPage, pages: Math.max(1, Math.ceil(total / perPage)) };
}

export type Archived = 'live' | 'archived' | 'all';

export function whereArchived<DBT extends Database, TB extends keyof DBT & string, O>(
	qb: SelectQueryBuilder<DBT, TB, O>,
	column: string,
	archived: Archived
): SelectQueryBuilder<DBT, TB, O> {
	if (archived === 'all') return qb;
	// The column name is ours (never user input).
	return qb.where(sql.ref(column), archived === 'live' ? 'is' : 'is not', null);
}

export function likePattern(q: string) {
	return `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
}

const iso = (d: Date | string | null) => (d == null ? null : new Date(d).toISOString());

// --- sites -------------------------------------------------------------------------------

export function siteDto(s: Site & { areas?: number | string; machines?: number | string }) {
	return {
		id: s.id,
		name: s.name,
		code: s.code,
		address: s.address,
		notes: s.notes,
		archivedAt: iso(s.archived_at),
		createdAt: iso(s.created_at)!,
		updatedAt: iso(s.updated_at)!,
		...(s.areas !== undefined ? { areaCount: Number(s.areas) } : {}),
		...(s.machines !== undefined ? { machineCount: Number(s.machines) } : {})
	};
}
export type SiteDto = ReturnType<typeof siteDto>;

export async function listSites(
	db: DB,
	organisationId: string,
	opts: { q?: string; archived?: Archived; page?: number; perPage?: number } = {}
) {
	const page = opts.page ?? 1;
	const perPage = opts.perPage ?? 100;
	let base = db.selectFrom('site').where('site.organisation_id', '=', organisationId);
	base = whereArchived(base, 'site.archived_at', opts.archived ?? 'live');
	if (opts.q)
		base = base.where((eb) => eb.or([eb('site.name', 'ilike', likePattern(opts.q!)), eb('site.code', 'ilike', likePattern(opts.q!))]));
	const [rows, count] = await Promise.all([
		base
			.selectAll('site')
			.select((eb) => [
				eb
					.selectFrom('area')
					.select(eb.fn.countAll<string>().as('n'))
					.whereRef('area.site_id', '=', 'site.id')
					.where('area.archived_at', 'is', null)
					.as('areas'),
				eb
					.selectFrom('machine')
					.select(eb.fn.countAll<string>().as('n'))
					.whereRef('machine.site_id', '=', 'site.id')
					.where('machine.archived_at', 'is', null)
					.as('machines')
			])
			.orderBy('site.name')
			.orderBy('site.id')
			.limit(perPage)
			.offset((page - 1) * perPage)
			.execute(),
		base.select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
	]);
	return pageOf(
		rows.map((r) => siteDto({ ...r, areas: r.areas ?? 0, machines: r.machines ?? 0 })),
		Number(count.n),
		page,
		perPage
	);
}

export async function getSite(db: DB, organisationId: string, id: string) {
	const s = await db.selectFrom('site').selectAll().where('organisation_id', '=', organisationId).where('id', '=', id).executeTakeFirst();
	return s ? siteDto(s) : null;
}

export async function createSite(db: DB, organisationId: string, input: SiteInput) {
	const s = await db
		.insertInto('site')
		.values({ organisation_id: organisationId, name: input.name, code: input.code, address: input.address, notes: input.notes })
		.returningAll()
		.executeTakeFirstOrThrow();
	return siteDto(s);
}

export async function updateSite(db: DB, organisationId: string, id: string, input: Partial<SiteInput>) {
	const s = await db
		.updateTable('site')
		.set({ ...pick(input, { name: 'name', code: 'code', address: 'address', notes: 'notes' }), updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returningAll()
		.executeTakeFirst();
	return s ? siteDto(s) : null;
}

/** Archive a site; its areas, supply points and machines stay as they are (and readable). */
export async function archiveSite(db: DB, organisationId: string, id: string) {
	const s = await db
		.updateTable('site')
		.set({ archived_at: sql<Date>`coalesce(archived_at, now())`, updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returningAll()
		.executeTakeFirst();
	return s ? siteDto(s) : null;
}

// --- areas -------------------------------------------------------------------------------

export function areaDto(a: Area & { site_name?: string; supply_points?: number | string | null; machines?: number | string | null }) {
	return {
		id: a.id,
		siteId: a.site_id,
		...(a.site_name !== undefined ? { siteName: a.site_name } : {}),
		name: a.name,
		notes: a.notes,
		archivedAt: iso(a.archived_at),
		createdAt: iso(a.created_at)!,
		updatedAt: iso(a.updated_at)!,
		...(a.supply_points !== undefined ? { supplyPointCount: Number(a.supply_points ?? 0) } : {}),
		...(a.machines !== undefined ? { machineCount: Number(a.machines ?? 0) } : {})
	};
}
export type AreaDto = ReturnType<typeof areaDto>;

export async function listAreas(
	db: DB,
	organisationId: string,
	opts: { siteId?: string; q?: string; archived?: Archived; page?: number; perPage?: number } = {}
) {
	const page = opts.page ?? 1;
	const perPage = opts.perPage ?? 200;
	let base = db.selectFrom('area').innerJoin('site', 'site.id', 'area.site_id').where('area.organisation_id', '=', organisationId);
	base = whereArchived(base, 'area.archived_at', opts.archived ?? 'live');
	if (opts.siteId) base = base.where('area.site_id', '=', opts.siteId);
	if (opts.q) base = base.where('area.name', 'ilike', likePattern(opts.q));
	const [rows, count] = await Promise.all([
		base
			.selectAll('area')
			.select('site.name as site_name')
			.select((eb) => [
				eb
					.selectFrom('supply_point')
					.select(eb.fn.countAll<string>().as('n'))
					.whereRef('supply_point.area_id', '=', 'area.id')
					.where('supply_point.archived_at', 'is', null)
					.as('supply_points'),
				eb
					.selectFrom('machine')
					.select(eb.fn.countAll<string>().as('n'))
					.whereRef('machine.area_id', '=', 'area.id')
					.where('machine.archived_at', 'is', null)
					.as('machines')
			])
			.orderBy('site.name')
			.orderBy('area.name')
			.orderBy('area.id')
			.limit(perPage)
			.offset((page - 1) * perPage)
			.execute(),
		base.select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
	]);
	return pageOf(rows.map(areaDto), Number(count.n), page, perPage);
}

export async function getArea(db: DB, organisationId: string, id: string) {
	const a = await db
		.selectFrom('area')
		.innerJoin('site', 'site.id', 'area.site_id')
		.selectAll('area')
		.select('site.name as site_name')
		.where('area.organisation_id', '=', organisationId)
		.where('area.id', '=', id)
		.executeTakeFirst();
	return a ? areaDto(a) : null;
}

export async function createArea(db: DB, organisationId: string, input: AreaInput) {
	const site = await getSite(db, organisationId, input.siteId);
	if (!site) throw new RegisterError(404, 'No such site in your organisation.', 'siteId');
	if (site.archivedAt) throw new RegisterError(409, 'This site is archived: restore it before adding areas.', 'siteId');
	const a = await db
		.insertInto('area')
		.values({ organisation_id: organisationId, site_id: input.siteId, name: input.name, notes: input.notes })
		.returningAll()
		.executeTakeFirstOrThrow();
	return areaDto({ ...a, site_name: site.name });
}

export async function updateArea(db: DB, organisationId: string, id: string, input: Partial<Omit<AreaInput, 'siteId'>>) {
	const a = await db
		.updateTable('area')
		.set({ ...pick(input, { name: 'name', notes: 'notes' }), updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return a ? getArea(db, organisationId, id) : null;
}

export async function archiveArea(db: DB, organisationId: string, id: string) {
	const a = await db
		.updateTable('area')
		.set({ archived_at: sql<Date>`coalesce(archived_at, now())`, updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return a ? getArea(db, organisationId, id) : null;
}

// --- supply points -----------------------------------------------------------------------

export function supplyPointDto(p: SupplyPoint & { area_name?: string; site_id?: string }) {
	return {
		id: p.id,
		areaId: p.area_id,
		...(p.area_name !== undefined ? { areaName: p.area_name } : {}),
		...(p.site_id !== undefined ? { siteId: p.site_id } : {}),
		name: p.name,
		tag: p.tag,
		voltageV: p.voltage_v,
		maxCurrentA: p.max_current_a,
		locationNote: p.location_note,
		archivedAt: iso(p.archived_at),
		createdAt: iso(p.created_at)!,
		updatedAt: iso(p.updated_at)!
	};
}
export type SupplyPointDto = ReturnType<typeof supplyPointDto>;

function supplyPointQuery(db: DB, organisationId: string) {
	return db
		.selectFrom('supply_point')
		.innerJoin('area', 'area.id', 'supply_point.area_id')
		.where('supply_point.organisation_id', '=', organisationId);
}

export async function listSupplyPoints(
	db: DB,
	organisationId: string,
	opts: { areaId?: string; siteId?: string; q?: string; archived?: Archived; page?: number; perPage?: number } = {}
) {
	const page = opts.page ?? 1;
	const perPage = opts.perPage ?? 200;
	let base = supplyPointQuery(db, organisationId);
	base = whereArchived(base, 'supply_point.archived_at', opts.archived ?? 'live');
	if (opts.areaId) base = base.where('supply_point.area_id', '=', opts.areaId);
	if (opts.siteId) base = base.where('area.site_id', '=', opts.siteId);
	if (opts.q)
		base = base.where((eb) =>
			eb.or([eb('supply_point.name', 'ilike', likePattern(opts.q!)), eb('supply_point.tag', 'ilike', likePattern(opts.q!))])
		);
	const [rows, count] = await Promise.all([
		base
			.selectAll('supply_point')
			.select(['area.name as area_name', 'area.site_id as site_id'])
			.orderBy('area.name')
			.orderBy('supply_point.name')
			.orderBy('supply_point.id')
			.limit(perPage)
			.offset((page - 1) * perPage)
			.execute(),
		base.select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
	]);
	return pageOf(rows.map(supplyPointDto), Number(count.n), page, perPage);
}

export async function getSupplyPoint(db: DB, organisationId: string, id: string) {
	const p = await supplyPointQuery(db, organisationId)
		.selectAll('supply_point')
		.select(['area.name as area_name', 'area.site_id as site_id'])
		.where('supply_point.id', '=', id)
		.executeTakeFirst();
	return p ? supplyPointDto(p) : null;
}

export async function createSupplyPoint(db: DB, organisationId: string, input: SupplyPointInput) {
	const area = await getArea(db, organisationId, input.areaId);
	if (!area) throw new RegisterError(404, 'No such area in your organisation.', 'areaId');
	if (area.archivedAt) throw new RegisterError(409, 'This area is archived: restore it before adding supply points.', 'areaId');
	const p = await db
		.insertInto('supply_point')
		.values({
			organisation_id: organisationId,
			area_id: input.areaId,
			name: input.name,
			tag: input.tag,
			voltage_v: input.voltageV,
			max_current_a: input.maxCurrentA,
			location_note: input.locationNote
		})
		.returning('id')
		.executeTakeFirstOrThrow();
	return (await getSupplyPoint(db, organisationId, p.id))!;
}

export async function updateSupplyPoint(db: DB, organisationId: string, id: string, input: Partial<Omit<SupplyPointInput, 'areaId'>>) {
	const p = await db
		.updateTable('supply_point')
		.set({
			...pick(input, { name: 'name', tag: 'tag', voltageV: 'voltage_v', maxCurrentA: 'max_current_a', locationNote: 'location_note' }),
			updated_at: sql<Date>`now()`
		})
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return p ? getSupplyPoint(db, organisationId, id) : null;
}

export async function archiveSupplyPoint(db: DB, organisationId: string, id: string) {
	const p = await db
		.updateTable('supply_point')
		.set({ archived_at: sql<Date>`coalesce(archived_at, now())`, updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return p ? getSupplyPoint(db, organisationId, id) : null;
}

/** Copy the keys present in `input` to their column names (absent keys stay untouched). */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- the column map is checked by the callers' tests
export function pick<I extends object, M extends { [K in keyof I]?: string }>(input: I, map: M): any {
	const out: Record<string, unknown> = {};
	for (const [k, col] of Object.entries(map) as Array<[keyof I, string]>) {
		if (input[k] !== undefined) out[col] = input[k];
	}
	return out;
}
