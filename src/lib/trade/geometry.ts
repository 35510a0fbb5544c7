import { describe, requireNumber } from './validate';

/** A point on the board, [x, y], in any consistent unit (pixels, metres). */
export type Vec2 = [number, number];

/**
 * Relative tolerance for orientation tests. Treating near-collinear as collinear makes a
 * route that grazes a keep-out zone count as touching it, which is the safe reading.
 */
const REL_EPS = 1e-10;

export function assertPoints(field: string, points: unknown): Vec2[] {
	if (!Array.isArray(points)) {
		throw new RangeError(`${field} must be an array of [x, y] pairs, got ${describe(points)}`);
	}
	points.forEach((p, i) => {
		if (!Array.isArray(p) || p.length !== 2) {
			throw new RangeError(`${field}[${i}] must be an [x, y] pair`);
		}
		requireNumber(`${field}[${i}][0]`, p[0]);
		requireNumber(`${field}[${i}][1]`, p[1]);
	});
	return points as Vec2[];
}

export function distance(a: Vec2, b: Vec2): number {
	return Math.hypot(b[0] - a[0], b[1] - a[1]);
}

/** Sum of segment lengths; 0 for an empty or single-point polyline. */
export function polylineLength(points: Vec2[]): number {
	assertPoints('points', points);
	let total = 0;
	for (let i = 1; i < points.length; i++) total += distance(points[i - 1], points[i]);
	return total;
}

/** Unsigned area by the shoelace formula; 0 for fewer than three corners. */
export function polygonArea(polygon: Vec2[]): number {
	assertPoints('polygon', polygon);
	if (polygon.length < 3) return 0;
	let twice = 0;
	for (let i = 0; i < polygon.length; i++) {
		const [x1, y1] = polygon[i];
		const [x2, y2] = polygon[(i + 1) % polygon.length];
		twice += x1 * y2 - x2 * y1;
	}
	return Math.abs(twice) / 2;
}

/** −1, 0 or 1: which side of the line a→b the point c lies on (0: collinear). */
function orientation(a: Vec2, b: Vec2, c: Vec2): -1 | 0 | 1 {
	const abx = b[0] - a[0];
	const aby = b[1] - a[1];
	const acx = c[0] - a[0];
	const acy = c[1] - a[1];
	const cross = abx * acy - aby * acx;
	const scale = Math.hypot(abx, aby) * Math.hypot(acx, acy);
	if (Math.abs(cross) <= REL_EPS * scale) return 0;
	return cross > 0 ? 1 : -1;
}

/** Whether c, already known to be collinear with a–b, lies within the segment's extent. */
function withinBox(a: Vec2, b: Vec2, c: Vec2): boolean {
	const tol = REL_EPS * (Math.abs(b[0] - a[0]) + Math.abs(b[1] - a[1]));
	return (
		c[0] >= Math.min(a[0], b[0]) - tol &&
		c[0] <= Math.max(a[0], b[0]) + tol &&
		c[1] >= Math.min(a[1], b[1]) - tol &&
		c[1] <= Math.max(a[1], b[1]) + tol
	);
}

function ordered(a: Vec2, b: Vec2): [Vec2, Vec2] {
	return a[0] < b[0] || (a[0] === b[0] && a[1] <= b[1]) ? [a, b] : [b, a];
}

/**
 * Closed-segment intersection: touching at an end, a vertex on the other segment and
 * collinear overlap all count. A zero-length segment behaves as a point. Endpoints are put
 * in a fixed order first so that the answer does not depend on the direction of travel.
 */
export function segmentsIntersect(p1: Vec2, p2: Vec2, q1: Vec2, q2: Vec2): boolean {
	[p1, p2] = ordered(p1, p2);
	[q1, q2] = ordered(q1, q2);
	const d1 = orientation(q1, q2, p1);
	const d2 = orientation(q1, q2, p2);
	const d3 = orientation(p1, p2, q1);
	const d4 = orientation(p1, p2, q2);
	if (d1 * d2 < 0 && d3 * d4 < 0) return true;
	if (d1 === 0 && withinBox(q1, q2, p1)) return true;
	if (d2 === 0 && withinBox(q1, q2, p2)) return true;
	if (d3 === 0 && withinBox(p1, p2, q1)) return true;
	if (d4 === 0 && withinBox(p1, p2, q2)) return true;
	return false;
}

/** Even-odd rule; a point on the boundary is reported by `pointOnPolygonBoundary`, not here. */
function pointStrictlyInside(p: Vec2, polygon: Vec2[]): boolean {
	let inside = false;
	for (let i = 0, j = polygon.length - 1; i < polygon.length; j = i++) {
		const [xi, yi] = polygon[i];
		const [xj, yj] = polygon[j];
		if (yi > p[1] !== yj > p[1]) {
			// Compared as offsets from the corner so that moving everything leaves the answer unchanged.
			if (p[0] - xi < ((xj - xi) * (p[1] - yi)) / (yj - yi)) inside = !inside;
		}
	}
	return inside;
}

function pointOnPolygonBoundary(p: Vec2, polygon: Vec2[]): boolean {
	for (let i = 0; i < polygon.length; i++) {
		const a = polygon[i];
		const b = polygon[(i + 1) % polygon.length];
		if (orientation(a, b, p) === 0 && withinBox(a, b, p)) return true;
	}
	return false;
}

/** Inside or on the boundary (even-odd rule for self-crossing outlines). */
export function pointInPolygon(p: Vec2, polygon: Vec2[]): boolean {
	assertPoints('point', [p]);
	assertPoints('polygon', polygon);
	if (polygon.length < 3) return false;
	return pointOnPolygonBoundary(p, polygon) || pointStrictlyInside(p, polygon);
}

/**
 * Whether a cable route touches or enters a keep-out zone. Crossing an edge, touching a
 * corner or an edge, running along an edge, and lying wholly inside all count.
 * Degenerate inputs: an empty route crosses nothing; a single point (or a route whose
 * segments have zero length) counts if it lies inside or on the zone; a zone with fewer
 * than three corners encloses nothing and is never crossed. The polygon is closed
 * implicitly (last corner back to the first).
 */
export function polylineCrossesPolygon(points: Vec2[], polygon: Vec2[]): boolean {
	assertPoints('points', points);
	assertPoints('polygon', polygon);
	if (points.length === 0 || polygon.length < 3) return false;
	if (points.length === 1) return pointInPolygon(points[0], polygon);
	for (let i = 1; i < points.length; i++) {
		for (let k = 0; k < polygon.length; k++) {
			if (segmentsIntersect(points[i - 1], points[i], polygon[k], polygon[(k + 1) % polygon.length])) {
				return true;
			}
		}
	}
	// No edge touched: every vertex is on the same side, so one vertex decides.
	return pointStrictlyInside(points[0], polygon);
}

/** Indexes of the zones a route touches or enters. */
export function keepOutZonesCrossed(points: Vec2[], zones: Vec2[][]): number[] {
	if (!Array.isArray(zones)) throw new RangeError(`zones must be an array of polygons, got ${describe(zones)}`);
	const hit: number[] = [];
	zones.forEach((zone, i) => {
		assertPoints(`zones[${i}]`, zone);
		if (polylineCrossesPolygon(points, zone)) hit.push(i);
	});
	return hit;
}

/**
 * Scale calibration: a line from `a` to `b` on the board (in board units, e.g. pixels)
 * is known to be `realLengthM` long. Returns metres per board unit.
 */
export function metresPerUnit(a: Vec2, b: Vec2, realLengthM: number): number {
	assertPoints('reference', [a, b]);
	requireNumber('realLengthM', realLengthM, { min: 0, exclusiveMin: true, max: 10_000, unit: 'm' });
	const d = distance(a, b);
	if (!(d > 0)) throw new RangeError('reference line must have two distinct ends to set the scale');
	return realLengthM / d;
}

/** Length of a polyline in metres, given the board scale in metres per unit. */
export function polylineLengthM(points: Vec2[], scaleMPerUnit: number): number {
	requireNumber('scaleMPerUnit', scaleMPerUnit, { min: 0, exclusiveMin: true });
	return polylineLength(points) * scaleMPerUnit;
}
