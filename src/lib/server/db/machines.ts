// Machines and their bearings. Archive, never delete: surveys refer to machines by id.
import { sql } from 'kysely';
import type { DB } from './index';
import type { Bearing, Machine } from './types';
import { RegisterError, likePattern, pageOf, pick, whereArchived, getSite, getArea } from './register';
import {
	bearingIssues,
	machineIssues,
	type BearingInput,
	type BearingUpdate,
	type MachineInput,
	type MachineListQuery,
	type MachineUpdate
} from '../../schemas/register';

const iso = (d: Date | string | null) => (d == null ? null : new Date(d).toISOString());

type MachineRow = Machine & {
	site_name: string;
	area_name: string | null;
	bearings?: string | number | null;
	photos?: string | number | null;
	thumb_media_id?: string | null;
};

export function machineDto(m: MachineRow) {
	return {
		id: m.id,
		siteId: m.site_id,
		siteName: m.site_name,
		areaId: m.area_id,
		areaName: m.area_name,
		name: m.name,
		tag: m.tag,
		kind: m.kind,
		speedRpm: m.speed_rpm,
		speedMode: m.speed_mode,
		speedSignal: m.speed_signal,
		powerKw: m.power_kw,
		foundation: m.foundation,
		hazardousArea: m.hazardous_area,
		hazardousZoneNote: m.hazardous_zone_note,
		notes: m.notes,
		archivedAt: iso(m.archived_at),
		createdAt: iso(m.created_at)!,
		updatedAt: iso(m.updated_at)!,
		...(m.bearings !== undefined ? { bearingCount: Number(m.bearings ?? 0) } : {}),
		...(m.photos !== undefined ? { mediaCount: Number(m.photos ?? 0) } : {}),
		...(m.thumb_media_id !== undefined ? { thumbMediaId: m.thumb_media_id } : {})
	};
}
export type MachineDto = ReturnType<typeof machineDto>;

const COLUMNS = {
	name: 'machine.name',
	tag: 'machine.tag',
	kind: 'machine.kind',
	site: 'site.name',
	area: 'area.name',
	speed: 'machine.speed_rpm',
	power: 'machine.power_kw',
	updated: 'machine.updated_at'
} as const;

function machineBase(db: DB, organisationId: string) {
	return db
		.selectFrom('machine')
		.innerJoin('site', 'site.id', 'machine.site_id')
		.leftJoin('area', 'area.id', 'machine.area_id')
		.where('machine.organisation_id', '=', organisationId);
}

function filtered(db: DB, organisationId: string, q: Partial<MachineListQuery>) {
	let base = machineBase(db, organisationId);
	base = whereArchived(base, 'machine.archived_at', q.archived ?? 'live');
	if (q.kind) base = base.where('machine.kind', '=', q.kind);
	if (q.siteId) base = base.where('machine.site_id', '=', q.siteId);
	if (q.areaId) base = base.where('machine.area_id', '=', q.areaId);
	if (q.hazardous) base = base.where('machine.hazardous_area', '=', q.hazardous === 'yes');
	if (q.q) {
		const p = likePattern(q.q);
		base = base.where((eb) =>
			eb.or([
				eb('machine.name', 'ilike', p),
				eb('machine.tag', 'ilike', p),
				eb('machine.notes', 'ilike', p),
				eb('area.name', 'ilike', p),
				eb('site.name', 'ilike', p)
			])
		);
	}
	return base;
}

export async function listMachines(db: DB, organisationId: string, q: MachineListQuery) {
	const base = filtered(db, organisationId, q);
	const col = COLUMNS[q.sort] ?? COLUMNS.name;
	const [rows, count] = await Promise.all([
		base
			.selectAll('machine')
			.select(['site.name as site_name', 'area.name as area_name'])
			.select((eb) => [
				eb
					.selectFrom('bearing')
					.select(eb.fn.countAll<string>().as('n'))
					.whereRef('bearing.machine_id', '=', 'machine.id')
					.where('bearing.archived_at', 'is', null)
					.as('bearings'),
				eb
					.selectFrom('media')
					.select(eb.fn.countAll<string>().as('n'))
					.whereRef('media.machine_id', '=', 'machine.id')
					.where('media.archived_at', 'is', null)
					.as('photos'),
				eb
					.selectFrom('media')
					.select('media.id')
					.whereRef('media.machine_id', '=', 'machine.id')
					.where('media.archived_at', 'is', null)
					.orderBy('media.created_at', 'desc')
					.limit(1)
					.as('thumb_media_id')
			])
			// Nulls last either way, then a stable tiebreak so pages never overlap.
			.orderBy(sql.ref(col), sql.raw(q.dir === 'desc' ? 'desc nulls last' : 'asc nulls last'))
			.orderBy('machine.name')
			.orderBy('machine.id')
			.limit(q.perPage)
			.offset((q.page - 1) * q.perPage)
			.execute(),
		base.select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
	]);
	return pageOf(rows.map(machineDto), Number(count.n), q.page, q.perPage);
}

/** Every machine that matches the filters, in the list's order (for the CSV export). */
export async function exportMachines(db: DB, organisationId: string, q: MachineListQuery) {
	const col = COLUMNS[q.sort] ?? COLUMNS.name;
	const rows = await filtered(db, organisationId, q)
		.selectAll('machine')
		.select(['site.name as site_name', 'area.name as area_name'])
		.orderBy(sql.ref(col), sql.raw(q.dir === 'desc' ? 'desc nulls last' : 'asc nulls last'))
		.orderBy('machine.name')
		.orderBy('machine.id')
		.limit(100_000)
		.execute();
	return rows.map(machineDto);
}

export async function getMachine(db: DB, organisationId: string, id: string) {
	const m = await machineBase(db, organisationId)
		.selectAll('machine')
		.select(['site.name as site_name', 'area.name as area_name'])
		.where('machine.id', '=', id)
		.executeTakeFirst();
	return m ? machineDto(m) : null;
}

async function checkPlace(db: DB, organisationId: string, siteId: string, areaId: string | null) {
	const site = await getSite(db, organisationId, siteId);
	if (!site) throw new RegisterError(404, 'No such site in your organisation.', 'siteId');
	if (site.archivedAt) throw new RegisterError(409, 'This site is archived: choose a live site.', 'siteId');
	if (areaId) {
		const area = await getArea(db, organisationId, areaId);
		if (!area) throw new RegisterError(404, 'No such area in your organisation.', 'areaId');
		if (area.siteId !== siteId)
			throw new RegisterError(400, "This area belongs to another site: choose an area of the machine's site.", 'areaId');
		if (area.archivedAt) throw new RegisterError(409, 'This area is archived: choose a live area.', 'areaId');
	}
}

function isTagConflict(e: unknown) {
	return (
		typeof e === 'object' &&
		e !== null &&
		(e as { code?: string }).code === '23505' &&
		String((e as { constraint?: string }).constraint) === 'machine_tag_key'
	);
}

const MACHINE_MAP = {
	siteId: 'site_id',
	areaId: 'area_id',
	name: 'name',
	tag: 'tag',
	kind: 'kind',
	speedRpm: 'speed_rpm',
	speedMode: 'speed_mode',
	speedSignal: 'speed_signal',
	powerKw: 'power_kw',
	foundation: 'foundation',
	hazardousArea: 'hazardous_area',
	hazardousZoneNote: 'hazardous_zone_note',
	notes: 'notes'
} as const;

export async function createMachine(db: DB, organisationId: string, input: MachineInput) {
	await checkPlace(db, organisationId, input.siteId, input.areaId);
	try {
		const m = await db
			.insertInto('machine')
			.values({ organisation_id: organisationId, ...pick(input, MACHINE_MAP) })
			.returning('id')
			.executeTakeFirstOrThrow();
		return (await getMachine(db, organisationId, m.id))!;
	} catch (e) {
		if (isTagConflict(e)) throw new RegisterError(409, `Another machine already has the tag "${input.tag}".`, 'tag');
		throw e;
	}
}

export async function updateMachine(db: DB, organisationId: string, id: string, input: MachineUpdate) {
	const current = await getMachine(db, organisationId, id);
	if (!current) return null;
	const merged = { ...current, ...Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)) };
	const issues = machineIssues(merged);
	const [field, message] = Object.entries(issues)[0] ?? [];
	if (field) throw new RegisterError(400, message!, field);
	if (input.siteId !== undefined || input.areaId !== undefined) {
		// Moving a machine to another site drops its area unless a new one is given.
		const siteId = merged.siteId;
		const areaId = input.areaId !== undefined ? input.areaId : siteId === current.siteId ? current.areaId : null;
		await checkPlace(db, organisationId, siteId, areaId);
		input = { ...input, areaId };
	}
	try {
		await db
			.updateTable('machine')
			.set({ ...pick(input, MACHINE_MAP), updated_at: sql<Date>`now()` })
			.where('organisation_id', '=', organisationId)
			.where('id', '=', id)
			.execute();
	} catch (e) {
		if (isTagConflict(e)) throw new RegisterError(409, `Another machine already has the tag "${input.tag}".`, 'tag');
		throw e;
	}
	return getMachine(db, organisationId, id);
}

export async function archiveMachine(db: DB, organisationId: string, id: string) {
	const r = await db
		.updateTable('machine')
		.set({ archived_at: sql<Date>`coalesce(archived_at, now())`, updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return r ? getMachine(db, organisationId, id) : null;
}

export async function restoreMachine(db: DB, organisationId: string, id: string) {
	try {
		const r = await db
			.updateTable('machine')
			.set({ archived_at: null, updated_at: sql<Date>`now()` })
			.where('organisation_id', '=', organisationId)
			.where('id', '=', id)
			.returning('id')
			.executeTakeFirst();
		return r ? getMachine(db, organisationId, id) : null;
	} catch (e) {
		if (isTagConflict(e)) throw new RegisterError(409, 'A live machine now has this tag: change one of the tags first.', 'tag');
		throw e;
	}
}

/** Live machines whose tag is one of `tags` (lower-cased), for the import's duplicate check. */
export async function tagsInUse(db: DB, organisationId: string, tags: string[]) {
	if (!tags.length) return new Set<string>();
	const rows = await db
		.selectFrom('machine')
		.select(sql<string>`lower(tag)`.as('t'))
		.where('organisation_id', '=', organisationId)
		.where('archived_at', 'is', null)
		.where(sql<string>`lower(tag)`, 'in', tags)
		.execute();
	return new Set(rows.map((r) => r.t));
}

// --- bearings ------------------------------------------------------------------------------

export function bearingDto(b: Bearing) {
	return {
		id: b.id,
		machineId: b.machine_id,
		position: b.position,
		component: b.component,
		designation: b.designation,
		rollingElements: b.rolling_elements,
		rollingElementDMm: b.rolling_element_d_mm,
		pitchDMm: b.pitch_d_mm,
		contactAngleDeg: b.contact_angle_deg,
		notes: b.notes,
		archivedAt: iso(b.archived_at),
		createdAt: iso(b.created_at)!,
		updatedAt: iso(b.updated_at)!
	};
}
export type BearingDto = ReturnType<typeof bearingDto>;

const BEARING_MAP = {
	position: 'position',
	component: 'component',
	designation: 'designation',
	rollingElements: 'rolling_elements',
	rollingElementDMm: 'rolling_element_d_mm',
	pitchDMm: 'pitch_d_mm',
	contactAngleDeg: 'contact_angle_deg',
	notes: 'notes'
} as const;

export async function listBearings(
	db: DB,
	organisationId: string,
	machineId: string,
	opts: { archived?: 'live' | 'archived' | 'all'; page?: number; perPage?: number } = {}
) {
	const page = opts.page ?? 1;
	const perPage = opts.perPage ?? 100;
	let base = db.selectFrom('bearing').where('organisation_id', '=', organisationId).where('machine_id', '=', machineId);
	base = whereArchived(base, 'bearing.archived_at', opts.archived ?? 'live');
	const [rows, count] = await Promise.all([
		base
			.selectAll()
			// Drive end first, then by component and creation.
			.orderBy('position')
			.orderBy('component')
			.orderBy('created_at')
			.orderBy('id')
			.limit(perPage)
			.offset((page - 1) * perPage)
			.execute(),
		base.select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
	]);
	return pageOf(rows.map(bearingDto), Number(count.n), page, perPage);
}

export async function getBearing(db: DB, organisationId: string, id: string) {
	const b = await db
		.selectFrom('bearing')
		.selectAll()
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.executeTakeFirst();
	return b ? bearingDto(b) : null;
}

export async function createBearing(db: DB, organisationId: string, machineId: string, input: BearingInput) {
	const machine = await getMachine(db, organisationId, machineId);
	if (!machine) throw new RegisterError(404, 'No such machine in your organisation.');
	if (machine.archivedAt) throw new RegisterError(409, 'This machine is archived: restore it before adding bearings.');
	const b = await db
		.insertInto('bearing')
		.values({ organisation_id: organisationId, machine_id: machineId, ...pick(input, BEARING_MAP) })
		.returningAll()
		.executeTakeFirstOrThrow();
	await touchMachine(db, organisationId, machineId);
	return bearingDto(b);
}

export async function updateBearing(db: DB, organisationId: string, id: string, input: BearingUpdate) {
	const current = await getBearing(db, organisationId, id);
	if (!current) return null;
	const merged = { ...current, ...Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)) };
	const [field, message] = Object.entries(bearingIssues(merged))[0] ?? [];
	if (field) throw new RegisterError(400, message!, field);
	const b = await db
		.updateTable('bearing')
		.set({ ...pick(input, BEARING_MAP), updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returningAll()
		.executeTakeFirstOrThrow();
	await touchMachine(db, organisationId, b.machine_id);
	return bearingDto(b);
}

export async function archiveBearing(db: DB, organisationId: string, id: string) {
	const b = await db
		.updateTable('bearing')
		.set({ archived_at: sql<Date>`coalesce(archived_at, now())`, updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returningAll()
		.executeTakeFirst();
	if (b) await touchMachine(db, organisationId, b.machine_id);
	return b ? bearingDto(b) : null;
}

async function touchMachine(db: DB, organisationId: string, id: string) {
	await db
		.updateTable('machine')
		.set({ updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.execute();
}
