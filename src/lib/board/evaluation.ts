// Findings for the live board, worked out again only for what changed. A point's findings
// depend on the point, its first cable route, the keep-out zones and the scale; with the live
// snapshot keeping unchanged items as the same objects, a point whose inputs are all the same
// objects as last time keeps its evaluation. The result always equals `evaluateBoard`.
import { evaluateBoard, type BoardEvaluation, type BoardEvaluationContext, type PointEvaluation, type RouteEvaluation } from '../trade';
import type { BoardRoute, BoardSnapshot } from './model/schema';
import type { Severity } from '../trade';

export class BoardEvaluator {
	#ctx: BoardEvaluationContext;
	#prev: { board: BoardSnapshot; routeOf: Map<string, BoardRoute>; result: BoardEvaluation<BoardRoute> } | null = null;

	constructor(ctx: BoardEvaluationContext) {
		this.#ctx = ctx;
	}

	evaluate(board: BoardSnapshot): BoardEvaluation<BoardRoute> {
		const prev = this.#prev;
		const routeOf = new Map<string, BoardRoute>();
		for (const r of board.routes) if (!routeOf.has(r.pointId)) routeOf.set(r.pointId, r);
		if (!prev || prev.board.zones !== board.zones || prev.board.scale !== board.scale)
			return this.#keep(board, routeOf, evaluateBoard(board, this.#ctx));
		if (prev.board === board) return prev.result;

		const before = new Map(prev.board.points.map((p) => [p.id, p]));
		const dirty = board.points.filter((p) => before.get(p.id) !== p || prev.routeOf.get(p.id) !== routeOf.get(p.id));
		if (dirty.length > board.points.length / 2) return this.#keep(board, routeOf, evaluateBoard(board, this.#ctx));
		const fresh = evaluateBoard({ points: dirty, routes: board.routes, zones: board.zones, scale: board.scale }, this.#ctx);
		const again = new Set(dirty.map((p) => p.id));

		const points = new Map<string, PointEvaluation<BoardRoute>>();
		const counts: Record<Severity, number> = { pass: 0, warn: 0, fail: 0 };
		for (const p of board.points) {
			const e = again.has(p.id) ? fresh.points.get(p.id)! : prev.result.points.get(p.id)!;
			points.set(p.id, e);
			counts[e.worst]++;
		}
		const routes = new Map<string, RouteEvaluation>();
		for (const r of board.routes) {
			const first = routeOf.get(r.pointId) === r && points.has(r.pointId);
			// The first route of an unchanged point is unchanged too (same route, zones and scale).
			const e = first && !again.has(r.pointId) ? prev.result.routes.get(r.id) : fresh.routes.get(r.id);
			routes.set(r.id, e ?? fresh.routes.get(r.id)!);
		}
		const zones = new Map(board.zones.map((z) => [z.id, { id: z.id, crossingRouteIds: [] as string[] }]));
		for (const r of board.routes) for (const zid of routes.get(r.id)!.geometry.crossesZoneIds) zones.get(zid)?.crossingRouteIds.push(r.id);
		return this.#keep(board, routeOf, { points, routes, zones, counts });
	}

	#keep(board: BoardSnapshot, routeOf: Map<string, BoardRoute>, result: BoardEvaluation<BoardRoute>) {
		this.#prev = { board, routeOf, result };
		return result;
	}
}
