// Comparing two revisions of a survey: points and routes added, removed, moved (distance on the
// photo in pixels and, when the board has a scale, in mm) and changed field by field. Pure; the
// revision page and the board overlay both use it.

export type Vec = [number, number];

export interface RevisionScale {
	a: Vec;
	b: Vec;
	lengthMm: number;
}

export interface ComparableBoard {
	boardId: string;
	title: string;
	scale: RevisionScale | null;
}

export interface ComparablePoint {
	boardId: string;
	id: string;
	label: string;
	x: number;
	y: number;
	/** Every stored field of the point (position and creation time are left out of the comparison). */
	fields: Record<string, unknown>;
}

export interface ComparableRoute {
	boardId: string;
	id: string;
	pointId: string;
	vertices: Vec[];
	fields: Record<string, unknown>;
}

export interface ComparableRevision {
	number: number;
	boards: ComparableBoard[];
	points: ComparablePoint[];
	routes: ComparableRoute[];
}

export interface ItemRef {
	boardId: string;
	boardTitle: string;
	id: string;
	/** The point's label; for a route, the label of the point it starts at. */
	label: string;
}

export interface FieldChange {
	field: string;
	before: unknown;
	after: unknown;
}

export interface Moved {
	item: ItemRef;
	distancePx: number;
	/** With the board's scale (the later revision's, else the earlier one's); null without. */
	distanceMm: number | null;
}

export interface Changed {
	item: ItemRef;
	changes: FieldChange[];
}

export interface KindDiff {
	added: ItemRef[];
	removed: ItemRef[];
	moved: Moved[];
	changed: Changed[];
}

export interface RevisionDiff {
	from: number;
	to: number;
	points: KindDiff;
	routes: KindDiff;
}

/** Positions closer than this (image pixels) count as not moved: float noise, not a move. */
export const MOVE_TOLERANCE_PX = 0.5;

const POINT_IGNORED = new Set(['x', 'y', 'createdAt']);
const ROUTE_IGNORED = new Set(['vertices', 'createdAt']);

export function mmPerPx(scale: RevisionScale | null): number | null {
	if (!scale) return null;
	const px = Math.hypot(scale.b[0] - scale.a[0], scale.b[1] - scale.a[1]);
	return px >= 1 && scale.lengthMm > 0 ? scale.lengthMm / px : null;
}

function same(a: unknown, b: unknown): boolean {
	return JSON.stringify(a ?? null) === JSON.stringify(b ?? null);
}

function fieldChanges(before: Record<string, unknown>, after: Record<string, unknown>, ignored: Set<string>): FieldChange[] {
	const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])].filter((k) => !ignored.has(k)).sort();
	return keys
		.filter((k) => !same(before[k], after[k]))
		.map((field) => ({ field, before: before[field] ?? null, after: after[field] ?? null }));
}

/** How far a polyline moved: the largest distance from a vertex of one to the nearest vertex of the other. */
export function polylineShift(a: Vec[], b: Vec[]): number {
	if (a.length === 0 || b.length === 0) return 0;
	const nearest = (p: Vec, line: Vec[]) => Math.min(...line.map((q) => Math.hypot(p[0] - q[0], p[1] - q[1])));
	return Math.max(...a.map((p) => nearest(p, b)), ...b.map((p) => nearest(p, a)));
}

const key = (boardId: string, id: string) => `${boardId}\u0000${id}`;
const round = (n: number, digits: number) => Math.round(n * 10 ** digits) / 10 ** digits;

export function compareRevisions(from: ComparableRevision, to: ComparableRevision): RevisionDiff {
	const titles = new Map<string, string>();
	for (const b of from.boards) titles.set(b.boardId, b.title);
	for (const b of to.boards) titles.set(b.boardId, b.title);
	const scales = new Map<string, RevisionScale | null>();
	for (const b of from.boards) scales.set(b.boardId, b.scale);
	for (const b of to.boards) if (b.scale || !scales.get(b.boardId)) scales.set(b.boardId, b.scale);

	const labelIn = (rev: ComparableRevision) => new Map(rev.points.map((p) => [key(p.boardId, p.id), p.label]));
	const labelsFrom = labelIn(from);
	const labelsTo = labelIn(to);
	const pointRef = (p: ComparablePoint): ItemRef => ({
		boardId: p.boardId,
		boardTitle: titles.get(p.boardId) ?? '',
		id: p.id,
		label: p.label
	});
	const routeRef = (r: ComparableRoute): ItemRef => ({
		boardId: r.boardId,
		boardTitle: titles.get(r.boardId) ?? '',
		id: r.id,
		label: labelsTo.get(key(r.boardId, r.pointId)) ?? labelsFrom.get(key(r.boardId, r.pointId)) ?? '?'
	});
	const distance = (boardId: string, px: number): Moved['distanceMm'] => {
		const f = mmPerPx(scales.get(boardId) ?? null);
		return f === null ? null : round(px * f, 1);
	};

	const points: KindDiff = { added: [], removed: [], moved: [], changed: [] };
	const before = new Map(from.points.map((p) => [key(p.boardId, p.id), p]));
	const after = new Map(to.points.map((p) => [key(p.boardId, p.id), p]));
	for (const [k, p] of after) {
		const old = before.get(k);
		if (!old) {
			points.added.push(pointRef(p));
			continue;
		}
		const px = Math.hypot(p.x - old.x, p.y - old.y);
		if (px > MOVE_TOLERANCE_PX) points.moved.push({ item: pointRef(p), distancePx: round(px, 1), distanceMm: distance(p.boardId, px) });
		const changes = fieldChanges(old.fields, p.fields, POINT_IGNORED);
		if (changes.length) points.changed.push({ item: pointRef(p), changes });
	}
	for (const [k, p] of before) if (!after.has(k)) points.removed.push(pointRef(p));

	const routes: KindDiff = { added: [], removed: [], moved: [], changed: [] };
	const rBefore = new Map(from.routes.map((r) => [key(r.boardId, r.id), r]));
	const rAfter = new Map(to.routes.map((r) => [key(r.boardId, r.id), r]));
	for (const [k, r] of rAfter) {
		const old = rBefore.get(k);
		if (!old) {
			routes.added.push(routeRef(r));
			continue;
		}
		const px = polylineShift(old.vertices, r.vertices);
		if (px > MOVE_TOLERANCE_PX) routes.moved.push({ item: routeRef(r), distancePx: round(px, 1), distanceMm: distance(r.boardId, px) });
		const changes = fieldChanges(old.fields, r.fields, ROUTE_IGNORED);
		if (changes.length) routes.changed.push({ item: routeRef(r), changes });
	}
	for (const [k, r] of rBefore) if (!rAfter.has(k)) routes.removed.push(routeRef(r));

	const byLabel = (a: { label: string; boardTitle: string }, b: { label: string; boardTitle: string }) =>
		a.boardTitle.localeCompare(b.boardTitle) || a.label.localeCompare(b.label, undefined, { numeric: true });
	for (const d of [points, routes]) {
		d.added.sort(byLabel);
		d.removed.sort(byLabel);
		d.moved.sort((a, b) => byLabel(a.item, b.item));
		d.changed.sort((a, b) => byLabel(a.item, b.item));
	}
	return { from: from.number, to: to.number, points, routes };
}
