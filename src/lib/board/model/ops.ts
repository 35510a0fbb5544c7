// Every change to a board goes through these operations. Each runs in one transaction with the
// caller's origin (the user's own by default), validates its input with the shared schemas
// and throws a RangeError or ZodError instead of storing something unchecked.
import * as Y from 'yjs';
import type { Vec2 } from '../../trade';
import {
	isReviewDecision,
	pointDecisionSchema,
	pointFieldsSchema,
	pointPatchSchema,
	routeFieldsSchema,
	routePatchSchema,
	routeVerticesSchema,
	scaleSchema,
	vec2Schema,
	zonePatchSchema,
	zonePolygonSchema,
	type PointPatch,
	type DecisionReason,
	type PointStatus,
	type RoutePatch,
	type ScaleData,
	type ZonePatch
} from '../../schemas/board';
import { kindOf, LOCAL_ORIGIN, maps, META_SCALE, POINT_DEFAULTS, readPoint, ROUTE_DEFAULTS, ZONE_DEFAULTS } from './schema';

export type Origin = unknown;

/** Random id that works in any browser context (crypto.randomUUID needs a secure context). */
export function newId(): string {
	const bytes = new Uint8Array(12);
	globalThis.crypto.getRandomValues(bytes);
	return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

/** Who edits a document here: each change an operation makes is signed with this name. */
const editors = new WeakMap<Y.Doc, string>();

export function setEditor(doc: Y.Doc, name: string | null): void {
	if (name) editors.set(doc, name.slice(0, 200));
	else editors.delete(doc);
}

function setAll(m: Y.Map<unknown>, fields: Record<string, unknown>) {
	for (const [k, v] of Object.entries(fields)) {
		if (v === undefined) continue;
		m.set(k, v);
	}
	const doc = m.doc;
	const editor = doc ? editors.get(doc) : undefined;
	if (editor) {
		m.set('updatedBy', editor);
		m.set('updatedAt', Date.now());
	}
}

function position(x: number, y: number): Vec2 {
	return vec2Schema.parse([x, y]) as Vec2;
}

/** P1, P2, …: one more than the highest number among labels of that form. */
export function nextPointLabel(doc: Y.Doc): string {
	let max = 0;
	maps(doc).points.forEach((m) => {
		if (!(m instanceof Y.Map)) return;
		const label = m.get('label');
		const hit = typeof label === 'string' ? /^P(\d{1,6})$/.exec(label.trim()) : null;
		if (hit) max = Math.max(max, Number(hit[1]));
	});
	return `P${max + 1}`;
}

export interface NewPoint extends PointPatch {
	x: number;
	y: number;
	createdBy?: string;
}

export function addPoint(doc: Y.Doc, input: NewPoint, origin: Origin = LOCAL_ORIGIN): string {
	const { x, y, createdBy, ...patch } = input;
	const [px, py] = position(x, y);
	const fields = pointPatchSchema.parse(patch);
	const id = newId();
	doc.transact(() => {
		const m = new Y.Map<unknown>();
		maps(doc).points.set(id, m);
		setAll(m, {
			...POINT_DEFAULTS,
			label: nextPointLabel(doc),
			...fields,
			x: px,
			y: py,
			createdBy: createdBy ?? '',
			createdAt: Date.now()
		});
	}, origin);
	return id;
}

/** Moves a point; routes that start at it move their first corner with it. */
export function movePoint(doc: Y.Doc, id: string, x: number, y: number, origin: Origin = LOCAL_ORIGIN): boolean {
	const [px, py] = position(x, y);
	const m = maps(doc).points.get(id);
	if (!(m instanceof Y.Map)) return false;
	doc.transact(() => {
		setAll(m, { x: px, y: py });
		maps(doc).routes.forEach((r) => {
			if (!(r instanceof Y.Map) || r.get('pointId') !== id) return;
			const v = r.get('vertices');
			if (Array.isArray(v) && v.length >= 2) setAll(r, { vertices: [[px, py], ...v.slice(1)] });
		});
	}, origin);
	return true;
}

export function updatePoint(doc: Y.Doc, id: string, patch: PointPatch, origin: Origin = LOCAL_ORIGIN): boolean {
	const fields = pointPatchSchema.parse(patch);
	const m = maps(doc).points.get(id);
	if (!(m instanceof Y.Map)) return false;
	doc.transact(() => setAll(m, fields), origin);
	return true;
}

export interface Decider {
	userId: string;
	name: string;
	/** Why a point is flagged or rejected (from the trade's list) and in the engineer's words. */
	reason?: DecisionReason | null;
	note?: string | null;
}

/**
 * Records a review decision (or reopens the point with 'proposed'): the status together with who
 * decided and when, so a refusal can later say "approved by Esme at 10:42". Only roles that may
 * decide should call it; the board policy refuses it from anyone else.
 */
export function decidePoint(
	doc: Y.Doc,
	id: string,
	status: PointStatus,
	by: Decider,
	at: number = Date.now(),
	origin: Origin = LOCAL_ORIGIN
): boolean {
	const s = pointFieldsSchema.shape.status.parse(status);
	const m = maps(doc).points.get(id);
	if (!(m instanceof Y.Map)) return false;
	const decided = isReviewDecision(s);
	const withReason = decided && s !== 'approved';
	const record = pointDecisionSchema.parse(
		decided
			? {
					decidedBy: by.userId,
					decidedByName: by.name,
					decidedAt: at,
					decisionReason: withReason ? (by.reason ?? null) : null,
					decisionNote: withReason && by.note?.trim() ? by.note.trim() : null
				}
			: { decidedBy: null, decidedByName: null, decidedAt: null, decisionReason: null, decisionNote: null }
	);
	doc.transact(() => {
		setAll(m, { status: s });
		// Reopening clears the record, but a point never decided keeps its keys absent.
		for (const [k, v] of Object.entries(record)) if (decided || m.has(k)) m.set(k, v);
	}, origin);
	return true;
}

/** Deletes a point and the routes that start at it. */
export function deletePoint(doc: Y.Doc, id: string, origin: Origin = LOCAL_ORIGIN): boolean {
	const { points, routes } = maps(doc);
	if (!points.has(id)) return false;
	doc.transact(() => {
		points.delete(id);
		for (const [rid, r] of [...routes.entries()]) {
			if (r instanceof Y.Map && r.get('pointId') === id) routes.delete(rid);
		}
	}, origin);
	return true;
}

export interface NewRoute extends RoutePatch {
	pointId: string;
	vertices: Vec2[];
}

export function addRoute(doc: Y.Doc, input: NewRoute, origin: Origin = LOCAL_ORIGIN): string {
	const { pointId, vertices, ...patch } = input;
	routeFieldsSchema.shape.pointId.parse(pointId);
	const v = routeVerticesSchema.parse(vertices) as Vec2[];
	const fields = routePatchSchema.parse(patch);
	const point = maps(doc).points.get(pointId);
	if (!(point instanceof Y.Map) || !readPoint(pointId, point)) {
		throw new RangeError('A cable route must start at a measurement point on this board.');
	}
	const id = newId();
	doc.transact(() => {
		const m = new Y.Map<unknown>();
		maps(doc).routes.set(id, m);
		setAll(m, { ...ROUTE_DEFAULTS, ...fields, pointId, vertices: v, createdAt: Date.now() });
	}, origin);
	return id;
}

export function updateRoute(doc: Y.Doc, id: string, patch: RoutePatch, origin: Origin = LOCAL_ORIGIN): boolean {
	const fields = routePatchSchema.parse(patch);
	const m = maps(doc).routes.get(id);
	if (!(m instanceof Y.Map)) return false;
	doc.transact(() => setAll(m, fields), origin);
	return true;
}

export function setRouteVertices(doc: Y.Doc, id: string, vertices: Vec2[], origin: Origin = LOCAL_ORIGIN): boolean {
	const v = routeVerticesSchema.parse(vertices) as Vec2[];
	const m = maps(doc).routes.get(id);
	if (!(m instanceof Y.Map)) return false;
	doc.transact(() => setAll(m, { vertices: v }), origin);
	return true;
}

export function deleteRoute(doc: Y.Doc, id: string, origin: Origin = LOCAL_ORIGIN): boolean {
	const { routes } = maps(doc);
	if (!routes.has(id)) return false;
	doc.transact(() => routes.delete(id), origin);
	return true;
}

export interface NewZone extends ZonePatch {
	polygon: Vec2[];
}

export function addZone(doc: Y.Doc, input: NewZone, origin: Origin = LOCAL_ORIGIN): string {
	const { polygon, ...patch } = input;
	const p = zonePolygonSchema.parse(polygon) as Vec2[];
	const fields = zonePatchSchema.parse(patch);
	const id = newId();
	doc.transact(() => {
		const m = new Y.Map<unknown>();
		maps(doc).zones.set(id, m);
		setAll(m, { ...ZONE_DEFAULTS, ...fields, polygon: p, createdAt: Date.now() });
	}, origin);
	return id;
}

export function updateZone(doc: Y.Doc, id: string, patch: ZonePatch, origin: Origin = LOCAL_ORIGIN): boolean {
	const fields = zonePatchSchema.parse(patch);
	const m = maps(doc).zones.get(id);
	if (!(m instanceof Y.Map)) return false;
	doc.transact(() => setAll(m, fields), origin);
	return true;
}

export function setZonePolygon(doc: Y.Doc, id: string, polygon: Vec2[], origin: Origin = LOCAL_ORIGIN): boolean {
	const p = zonePolygonSchema.parse(polygon) as Vec2[];
	const m = maps(doc).zones.get(id);
	if (!(m instanceof Y.Map)) return false;
	doc.transact(() => setAll(m, { polygon: p }), origin);
	return true;
}

export function deleteZone(doc: Y.Doc, id: string, origin: Origin = LOCAL_ORIGIN): boolean {
	const { zones } = maps(doc);
	if (!zones.has(id)) return false;
	doc.transact(() => zones.delete(id), origin);
	return true;
}

/** Deletes any mix of points, routes and zones in one step (one undo). */
export function deleteItems(doc: Y.Doc, ids: readonly string[], origin: Origin = LOCAL_ORIGIN): number {
	let n = 0;
	doc.transact(() => {
		for (const id of ids) {
			const kind = kindOf(doc, id);
			if (kind === 'point') n += deletePoint(doc, id, origin) ? 1 : 0;
			else if (kind === 'route') n += deleteRoute(doc, id, origin) ? 1 : 0;
			else if (kind === 'zone') n += deleteZone(doc, id, origin) ? 1 : 0;
		}
	}, origin);
	return n;
}

export function setScale(doc: Y.Doc, scale: ScaleData, origin: Origin = LOCAL_ORIGIN): void {
	const s = scaleSchema.parse(scale);
	doc.transact(() => maps(doc).meta.set(META_SCALE, { a: s.a, b: s.b, lengthMm: s.lengthMm }), origin);
}

export function clearScale(doc: Y.Doc, origin: Origin = LOCAL_ORIGIN): void {
	doc.transact(() => maps(doc).meta.delete(META_SCALE), origin);
}

/**
 * Undo and redo of this user's own edits only. Changes from other people, from the server
 * and from offline storage carry other origins and are left alone.
 */
export function createUndoManager(doc: Y.Doc, origin: Origin = LOCAL_ORIGIN): Y.UndoManager {
	const m = maps(doc);
	return new Y.UndoManager([m.points, m.routes, m.zones, m.meta], {
		trackedOrigins: new Set([origin]),
		captureTimeout: 400
	});
}
