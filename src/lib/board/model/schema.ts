// The shape of a board's Yjs document. One Y.Map per kind of item, keyed by id; each item is
// its own Y.Map so two people editing different fields of the same point both keep their edit.
// The scale lives in the 'meta' map. Everything read back is checked field by field, because a
// peer (or an old client) may have written something this version does not accept.
import * as Y from 'yjs';
import type { Vec2 } from '../../trade';
import {
	pointDecisionSchema,
	pointFieldsSchema,
	routeFieldsSchema,
	scaleSchema,
	vec2Schema,
	zoneFieldsSchema,
	type PointDecision,
	type PointFields,
	type RouteFields,
	type ScaleData,
	type ZoneFields
} from '../../schemas/board';

export const MAP_POINTS = 'points';
export const MAP_ROUTES = 'routes';
export const MAP_ZONES = 'zones';
export const MAP_META = 'meta';
export const META_SCALE = 'scale';

/**
 * Origin of the user's own edits. The undo manager tracks only this origin, so undo never
 * takes back what someone else did, nor what arrived from the server or from offline storage.
 */
export const LOCAL_ORIGIN: unique symbol = Symbol('spotface.board.local');

export type ItemKind = 'point' | 'route' | 'zone';

export interface BoardPoint extends PointFields, PointDecision {
	id: string;
	x: number;
	y: number;
	createdBy: string;
	createdAt: number;
}

export interface BoardRoute extends RouteFields {
	id: string;
	vertices: Vec2[];
	createdAt: number;
}

export interface BoardZone extends ZoneFields {
	id: string;
	polygon: Vec2[];
	createdAt: number;
}

export interface BoardSnapshot {
	points: BoardPoint[];
	routes: BoardRoute[];
	zones: BoardZone[];
	scale: ScaleData | null;
}

export const POINT_DEFAULTS: Omit<PointFields, 'label'> = {
	component: '',
	direction: null,
	distanceToBearingMm: null,
	distanceLine: null,
	surface: null,
	flatDiameterMm: null,
	wallThicknessMm: null,
	mounting: null,
	material: null,
	surfaceTempC: null,
	status: 'proposed',
	notes: ''
};

export const ROUTE_DEFAULTS: Omit<RouteFields, 'pointId'> = {
	supplyPointId: null,
	exitLabel: '',
	lengthEnteredM: null,
	crossSectionMm2: null,
	fixings: null,
	supplyV: null,
	notes: ''
};

export const ZONE_DEFAULTS: ZoneFields = { label: '', kind: 'other' };

export function maps(doc: Y.Doc) {
	return {
		points: doc.getMap<Y.Map<unknown>>(MAP_POINTS),
		routes: doc.getMap<Y.Map<unknown>>(MAP_ROUTES),
		zones: doc.getMap<Y.Map<unknown>>(MAP_ZONES),
		meta: doc.getMap<unknown>(MAP_META)
	};
}

type FieldSchema = { safeParse(v: unknown): { success: boolean; data?: unknown } };
type FieldResult = { success: boolean; data?: unknown };

/**
 * Results of field schemas for plain values (strings, numbers, booleans, null), which repeat a
 * lot across a board (the same choices, components, sizes): parsing such a value is pure, so a
 * value's result is worked out once per schema. Kept small: each schema's table is emptied when
 * it grows past a few thousand values.
 */
const parsedValues = new WeakMap<FieldSchema, Map<unknown, FieldResult>>();
const MAX_PARSED_VALUES = 4096;

function parseField(schema: FieldSchema, value: unknown): FieldResult {
	const t = typeof value;
	// Objects are parsed every time, and so is -0 (a table keeps 0 and -0 as one key).
	if ((value !== null && t !== 'string' && t !== 'number' && t !== 'boolean') || Object.is(value, -0)) return schema.safeParse(value);
	let table = parsedValues.get(schema);
	if (!table) parsedValues.set(schema, (table = new Map()));
	let r = table.get(value);
	if (!r) {
		const parsed = schema.safeParse(value);
		r = parsed.success ? { success: true, data: parsed.data } : { success: false };
		if (table.size >= MAX_PARSED_VALUES) table.clear();
		table.set(value, r);
	}
	return r;
}

/** Reads the fields of one item; a field that fails its schema falls back to its default. */
function readFields<T extends Record<string, unknown>>(m: Y.Map<unknown>, shape: Record<string, FieldSchema>, defaults: T): T {
	const out: Record<string, unknown> = { ...defaults };
	for (const key of Object.keys(shape)) {
		const value = m.get(key);
		if (value === undefined && !m.has(key)) continue;
		const r = parseField(shape[key], value);
		if (r.success) out[key] = r.data;
	}
	return out as T;
}

function num(v: unknown): number | null {
	return typeof v === 'number' && Number.isFinite(v) ? v : null;
}

function vecList(v: unknown, min: number): Vec2[] | null {
	if (!Array.isArray(v) || v.length < min) return null;
	const out: Vec2[] = [];
	for (const p of v) {
		const r = vec2Schema.safeParse(p);
		if (!r.success) return null;
		out.push(r.data as Vec2);
	}
	return out;
}

export function readPoint(id: string, m: Y.Map<unknown>): BoardPoint | null {
	const x = num(m.get('x'));
	const y = num(m.get('y'));
	if (x === null || y === null) return null;
	const fields = readFields<PointFields>(m, pointFieldsSchema.shape, { label: '?', ...POINT_DEFAULTS });
	const decision = readFields<PointDecision>(m, pointDecisionSchema.shape, {
		decidedBy: null,
		decidedByName: null,
		decidedAt: null,
		decisionReason: null,
		decisionNote: null
	});
	return {
		id,
		x,
		y,
		createdBy: typeof m.get('createdBy') === 'string' ? (m.get('createdBy') as string) : '',
		createdAt: num(m.get('createdAt')) ?? 0,
		...fields,
		...decision
	};
}

export function readRoute(id: string, m: Y.Map<unknown>): BoardRoute | null {
	const vertices = vecList(m.get('vertices'), 2);
	const pointId = m.get('pointId');
	if (!vertices || typeof pointId !== 'string' || pointId === '') return null;
	const fields = readFields<RouteFields>(m, routeFieldsSchema.shape, { pointId, ...ROUTE_DEFAULTS });
	return { id, vertices, createdAt: num(m.get('createdAt')) ?? 0, ...fields };
}

export function readZone(id: string, m: Y.Map<unknown>): BoardZone | null {
	const polygon = vecList(m.get('polygon'), 3);
	if (!polygon) return null;
	const fields = readFields<ZoneFields>(m, zoneFieldsSchema.shape, { ...ZONE_DEFAULTS });
	return { id, polygon, createdAt: num(m.get('createdAt')) ?? 0, ...fields };
}

export function readScale(doc: Y.Doc): ScaleData | null {
	const r = scaleSchema.safeParse(maps(doc).meta.get(META_SCALE));
	return r.success ? r.data : null;
}

const byCreation = (a: { createdAt: number; id: string }, b: { createdAt: number; id: string }) =>
	a.createdAt - b.createdAt || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

function readAll<T extends { createdAt: number; id: string }>(
	map: Y.Map<Y.Map<unknown>>,
	read: (id: string, m: Y.Map<unknown>) => T | null
): T[] {
	const out: T[] = [];
	map.forEach((value, id) => {
		if (!(value instanceof Y.Map)) return;
		const item = read(id, value);
		if (item) out.push(item);
	});
	return out.sort(byCreation);
}

/** A plain, validated copy of the whole board, oldest items first. */
export function readBoard(doc: Y.Doc): BoardSnapshot {
	const m = maps(doc);
	return {
		points: readAll(m.points, readPoint),
		routes: readAll(m.routes, readRoute).filter((r) => m.points.has(r.pointId)),
		zones: readAll(m.zones, readZone),
		scale: readScale(doc)
	};
}

/** Which kind of item an id belongs to, if any. */
export function kindOf(doc: Y.Doc, id: string): ItemKind | null {
	const m = maps(doc);
	if (m.points.has(id)) return 'point';
	if (m.routes.has(id)) return 'route';
	if (m.zones.has(id)) return 'zone';
	return null;
}
