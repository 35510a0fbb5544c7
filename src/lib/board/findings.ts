// Live findings for a board: joins the document (points, routes, zones, scale) with the
// machine from the register and the organisation's thresholds, and asks the rule engine.
// Lengths measured on a calibrated photo are estimates (perspective, lens distortion), so a
// tape measurement typed in always wins over them.
import {
	distance,
	evaluatePoint,
	metresPerUnit,
	polylineCrossesPolygon,
	polylineLength,
	ruleInfo,
	worstSeverity,
	type Finding,
	type MachineInput,
	type RouteInput,
	type Severity,
	type Thresholds,
	type Vec2
} from '../trade';
import type { ScaleData } from '../schemas/board';
import type { BoardPoint, BoardRoute, BoardSnapshot, BoardZone } from './model/schema';

export type ValueSource = 'entered' | 'measured' | 'scale';

/** Metres per image pixel, or null when the board has no usable scale. */
export function scaleMetresPerUnit(scale: ScaleData | null): number | null {
	if (!scale) return null;
	try {
		return metresPerUnit(scale.a, scale.b, scale.lengthMm / 1000);
	} catch {
		return null;
	}
}

/** A length on the photo in mm, or null without a scale. */
export function photoLengthMm(points: Vec2[], scale: ScaleData | null): number | null {
	const m = scaleMetresPerUnit(scale);
	return m === null ? null : polylineLength(points) * m * 1000;
}

export interface DistanceValue {
	mm: number | null;
	/** 'entered': typed in (tape); 'measured': from the calibrated photo, an estimate. */
	source: 'entered' | 'measured' | null;
	/** The photo estimate, shown beside an entered value so a large gap stands out. */
	measuredMm: number | null;
}

export function pointDistance(point: Pick<BoardPoint, 'distanceToBearingMm' | 'distanceLine'>, scale: ScaleData | null): DistanceValue {
	const measuredMm = point.distanceLine ? photoLengthMm(point.distanceLine, scale) : null;
	if (point.distanceToBearingMm !== null) return { mm: point.distanceToBearingMm, source: 'entered', measuredMm };
	if (measuredMm !== null) return { mm: measuredMm, source: 'measured', measuredMm };
	return { mm: null, source: null, measuredMm: null };
}

export interface RouteGeometry {
	/** Length drawn on the photo, m (estimate), or null without a scale. */
	photoLengthM: number | null;
	/** The length the checks use: entered wins, else the photo estimate. */
	lengthM: number | null;
	lengthSource: 'entered' | 'scale' | null;
	/** Keep-out zones the route touches or enters. */
	crossesZoneIds: string[];
}

export function routeGeometry(route: BoardRoute, zones: readonly BoardZone[], scale: ScaleData | null): RouteGeometry {
	const photoMm = photoLengthMm(route.vertices, scale);
	const photoLengthM = photoMm === null ? null : photoMm / 1000;
	const crossesZoneIds = zones.filter((z) => polylineCrossesPolygon(route.vertices, z.polygon)).map((z) => z.id);
	if (route.lengthEnteredM !== null) return { photoLengthM, lengthM: route.lengthEnteredM, lengthSource: 'entered', crossesZoneIds };
	if (photoLengthM !== null) return { photoLengthM, lengthM: photoLengthM, lengthSource: 'scale', crossesZoneIds };
	return { photoLengthM: null, lengthM: null, lengthSource: null, crossesZoneIds };
}

function routeInput(route: BoardRoute, g: RouteGeometry): RouteInput {
	// The rule engine reports a missing length or cross-section by name; pass them through as null.
	return {
		lengthM: g.lengthM as number,
		crossSectionMm2: route.crossSectionMm2 as number,
		crossesKeepOut: g.crossesZoneIds.length > 0,
		supplyV: route.supplyV,
		fixed: route.fixings === null ? null : route.fixings !== 'none'
	};
}

const CHOICE_PROMPTS: Record<string, { rule?: string; message: string }> = {
	'point.surface': {
		message: 'Choose the surface the sensor sits on (bearing housing, solid casting, cover …) so the point can be checked.'
	},
	'point.mounting': {
		message: 'Choose the mounting (tapped stud, bonded pad or magnet) so the hole and seat can be checked.'
	},
	'machine.speedRpm': {
		rule: 'machine.speed',
		message: "The machine's speed is not in the register yet: add it (r/min) so the speed rules can be checked."
	},
	'route.lengthM': {
		rule: 'route.drawn',
		message: 'Enter the cable length, or set the scale so the drawn route can be measured.'
	},
	'route.crossSectionMm2': {
		rule: 'route.supply-voltage',
		message: 'Choose the conductor cross-section so the voltage at the sensor can be checked.'
	}
};

/**
 * A choice or value not yet made on a point being surveyed is a job still to do, not a broken
 * record: the engine's "missing" fail for these few fields becomes a "check" with a prompt.
 * Wrong values (out of range, unknown) stay fails.
 */
function softenMissing(findings: Finding[]): Finding[] {
	return findings.map((f) => {
		if (f.rule !== 'input.invalid' || !f.missing || !f.field) return f;
		const prompt = CHOICE_PROMPTS[f.field];
		if (!prompt) return f;
		const rule = prompt.rule ? ruleInfo(prompt.rule) : undefined;
		return rule
			? { ...f, rule: rule.id, reference: rule.reference, severity: 'warn' as const, message: prompt.message }
			: { ...f, severity: 'warn' as const, message: prompt.message };
	});
}

export interface PointEvaluation {
	id: string;
	findings: Finding[];
	worst: Severity;
	distance: DistanceValue;
	route: BoardRoute | null;
}

export interface RouteEvaluation {
	id: string;
	geometry: RouteGeometry;
	/** The route rules from the point's evaluation (length, keep-out, fixing, voltage). */
	findings: Finding[];
	worst: Severity;
}

export interface BoardEvaluation {
	points: Map<string, PointEvaluation>;
	routes: Map<string, RouteEvaluation>;
	counts: Record<Severity, number>;
}

export interface EvaluationContext {
	machine: MachineInput;
	/** The organisation's threshold overrides as stored; bad ones show up as findings. */
	thresholds?: Partial<Thresholds> | Record<string, unknown> | null;
}

export function evaluateBoard(board: BoardSnapshot, ctx: EvaluationContext): BoardEvaluation {
	const routeOf = new Map<string, BoardRoute>();
	for (const r of board.routes) if (!routeOf.has(r.pointId)) routeOf.set(r.pointId, r);
	const points = new Map<string, PointEvaluation>();
	const routes = new Map<string, RouteEvaluation>();
	const counts: Record<Severity, number> = { pass: 0, warn: 0, fail: 0 };

	for (const r of board.routes) {
		routes.set(r.id, { id: r.id, geometry: routeGeometry(r, board.zones, board.scale), findings: [], worst: 'pass' });
	}

	for (const p of board.points) {
		const dist = pointDistance(p, board.scale);
		const route = routeOf.get(p.id) ?? null;
		const g = route ? routes.get(route.id)!.geometry : null;
		const raw = evaluatePoint(
			{
				machine: ctx.machine,
				point: {
					surface: p.surface as never,
					mounting: p.mounting as never,
					flatDiameterMm: p.flatDiameterMm,
					wallThicknessMm: p.wallThicknessMm,
					distanceToBearingMm: dist.mm,
					surfaceTempC: p.surfaceTempC,
					material: p.material
				},
				route: route && g ? routeInput(route, g) : null
			},
			(ctx.thresholds ?? undefined) as Partial<Thresholds> | undefined
		);
		const findings = softenMissing(raw).map((f) =>
			f.rule === 'distance.bearing' && dist.source === 'measured' && f.value !== undefined
				? { ...f, message: `${f.message} (Estimated on the photo: measure with a tape to confirm.)` }
				: f
		);
		const worst = worstSeverity(findings);
		counts[worst]++;
		points.set(p.id, { id: p.id, findings, worst, distance: dist, route });
		if (route) {
			const rf = findings.filter((f) => f.rule.startsWith('route.') || (f.rule === 'input.invalid' && /\(route\./.test(f.message)));
			const entry = routes.get(route.id)!;
			entry.findings = rf;
			entry.worst = worstSeverity(rf);
		}
	}
	// Extra routes from the same point are not checked against the supply; say so.
	for (const r of board.routes) {
		if (routeOf.get(r.pointId) === r) continue;
		const entry = routes.get(r.id)!;
		entry.findings = [
			{
				rule: 'route.drawn',
				severity: 'warn',
				message: 'This point already has a cable route; only the first is checked. Delete the one that is not needed.',
				reference: 'Spotface input checks'
			}
		];
		entry.worst = 'warn';
	}
	return { points, routes, counts };
}

/** Straight-line length of a measuring line, mm, or null without a scale. */
export function measureMm(a: Vec2, b: Vec2, scale: ScaleData | null): number | null {
	const m = scaleMetresPerUnit(scale);
	return m === null ? null : distance(a, b) * m * 1000;
}

/** Natural order of labels: P2 before P10. */
export function compareLabels(a: string, b: string): number {
	return a.localeCompare(b, undefined, { numeric: true, sensitivity: 'base' });
}
