// What is under a finger or the mouse, worked out from the model rather than from canvas
// pixels, so touch targets can be as large as a fingertip whatever the zoom.
import { pointInPolygon, type Vec2 } from '../trade';
import type { BoardSnapshot } from './model/schema';
import type { HitTarget } from './tools/types';

function segmentDistance(p: Vec2, a: Vec2, b: Vec2): number {
	const dx = b[0] - a[0];
	const dy = b[1] - a[1];
	const len2 = dx * dx + dy * dy;
	const t = len2 === 0 ? 0 : Math.max(0, Math.min(1, ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / len2));
	return Math.hypot(p[0] - (a[0] + t * dx), p[1] - (a[1] + t * dy));
}

/**
 * Order of preference: a corner handle of a selected route or zone, then the nearest point,
 * then a route line, then the zone the position lies in (the smallest, if nested).
 * `radius` is in image units (a fingertip at the current zoom).
 */
export function hitTest(board: BoardSnapshot, selection: readonly string[], at: Vec2, radius: number): HitTarget {
	const sel = new Set(selection);
	for (const r of board.routes) {
		if (!sel.has(r.id)) continue;
		for (let i = r.vertices.length - 1; i >= 1; i--) {
			if (Math.hypot(r.vertices[i][0] - at[0], r.vertices[i][1] - at[1]) <= radius)
				return { kind: 'vertex', owner: 'route', id: r.id, index: i };
		}
	}
	for (const z of board.zones) {
		if (!sel.has(z.id)) continue;
		for (let i = 0; i < z.polygon.length; i++) {
			if (Math.hypot(z.polygon[i][0] - at[0], z.polygon[i][1] - at[1]) <= radius)
				return { kind: 'vertex', owner: 'zone', id: z.id, index: i };
		}
	}
	let best: { id: string; d: number } | null = null;
	for (const p of board.points) {
		const d = Math.hypot(p.x - at[0], p.y - at[1]);
		if (d <= radius && (!best || d < best.d)) best = { id: p.id, d };
	}
	if (best) return { kind: 'point', id: best.id };
	let route: { id: string; d: number } | null = null;
	for (const r of board.routes) {
		for (let i = 1; i < r.vertices.length; i++) {
			const d = segmentDistance(at, r.vertices[i - 1], r.vertices[i]);
			if (d <= radius * 0.75 && (!route || d < route.d)) route = { id: r.id, d };
		}
	}
	if (route) return { kind: 'route', id: route.id };
	let zone: { id: string; area: number } | null = null;
	for (const z of board.zones) {
		if (!pointInPolygon(at, z.polygon)) continue;
		const xs = z.polygon.map((p) => p[0]);
		const ys = z.polygon.map((p) => p[1]);
		const area = (Math.max(...xs) - Math.min(...xs)) * (Math.max(...ys) - Math.min(...ys));
		if (!zone || area < zone.area) zone = { id: z.id, area };
	}
	return zone ? { kind: 'zone', id: zone.id } : null;
}
