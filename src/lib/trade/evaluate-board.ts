// Findings for a whole board: its points, cable routes, keep-out zones and scale, with the machine
// from the register and the organisation's thresholds, checked by the rule engine. Pure and free
// of Yjs, so the browser (live, as people draw) and the server (pages, exports, approval) get the
// same findings from the same content: pass the board model's BoardSnapshot, or any plain object
// of the same shape (e.g. read from a stored document).
//
// Lengths measured on a calibrated photo are estimates (perspective, lens distortion), so a tape
// measurement typed in always wins over them.
import type { Finding, Severity } from './findings';
import { worstSeverity } from './findings';
import { distance, metresPerUnit, polylineCrossesPolygon, polylineLength, type Vec2 } from './geometry';
import { evaluatePoint, type MachineInput, type RouteInput } from './evaluate-point';
import { ruleInfo } from './rules';
import type { Thresholds } from './thresholds';

/** A calibration line on the photo (image pixels) and its real length. */
export interface BoardScaleInput {
	a: Vec2;
	b: Vec2;
	lengthMm: number;
}

/** What the checks read from a measurement point; unknown choices come out as findings. */
export interface BoardPointInput {
	id: string;
	surface: string | null;
	mounting: string | null;
	material: string | null;
	flatDiameterMm: number | null;
	wallThicknessMm: number | null;
	/** Entered (tape measure): wins over the line measured on the photo. */
	distanceToBearingMm: number | null;
	/** Seat to bearing, drawn on the photo (image coordinates); its length follows the scale. */
	distanceLine: [Vec2, Vec2] | null;
	surfaceTempC: number | null;
}

export interface BoardRouteInput {
	id: string;
	pointId: string;
	vertices: Vec2[];
	lengthEnteredM: number | null;
	crossSectionMm2: number | null;
	supplyV: number | null;
	/** 'none' when the cable will not be fixed along the route. */
	fixings: string | null;
}

export interface BoardZoneInput {
	id: string;
	polygon: Vec2[];
}

/**
 * A board's content, oldest items first (the first route drawn from a point is the one checked).
 * Routes whose point is not on the board are left out by the caller (the model's readBoard does).
 */
export interface BoardContent<
	P extends BoardPointInput = BoardPointInput,
	R extends BoardRouteInput = BoardRouteInput,
	Z extends BoardZoneInput = BoardZoneInput
> {
	points: readonly P[];
	routes: readonly R[];
	zones: readonly Z[];
	scale: BoardScaleInput | null;
}

export type ValueSource = 'entered' | 'measured' | 'scale';

/** Metres per image pixel, or null when the board has no usable scale. */
export function scaleMetresPerUnit(scale: BoardScaleInput | null): number | null {
	if (!scale) return null;
	try {
		return metresPerUnit(scale.a, scale.b, scale.lengthMm / 1000);
	} catch {
		return null;
	}
}

/** A length on the photo in mm, or null without a scale. */
export function photoLengthMm(points: Vec2[], scale: BoardScaleInput | null): number | null {
	const m = scaleMetresPerUnit(scale);
	return m === null ? null : polylineLength(points) * m * 1000;
}

/** Straight-line length of a measuring line, mm, or null without a scale. */
export function measureMm(a: Vec2, b: Vec2, scale: BoardScaleInput | null): number | null {
	const m = scaleMetresPerUnit(scale);
	return m === null ? null : distance(a, b) * m * 1000;
}

export interface DistanceValue {
	mm: number | null;
	/** 'entered': typed in (tape); 'measured': from the calibrated photo, an estimate. */
	source: 'entered' | 'measured' | null;
	/** The photo estimate, shown beside an entered value so a large gap stands out. */
	measuredMm: number | null;
}

export function pointDistance(
	point: Pick<BoardPointInput, 'distanceToBearingMm' | 'distanceLine'>,
	scale: BoardScaleInput | null
): DistanceValue {
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

export function routeGeometry(
	route: Pick<BoardRouteInput, 'vertices' | 'lengthEnteredM'>,
	zones: readonly BoardZoneInput[],
	scale: BoardScaleInput | null
): RouteGeometry {
	const photoMm = photoLengthMm(route.vertices, scale);
	const photoLengthM = photoMm === null ? null : photoMm / 1000;
	const crossesZoneIds = zones.filter((z) => polylineCrossesPolygon(route.vertices, z.polygon)).map((z) => z.id);
	if (route.lengthEnteredM !== null) return { photoLengthM, lengthM: route.lengthEnteredM, lengthSource: 'entered', crossesZoneIds };
	if (photoLengthM !== null) return { photoLengthM, lengthM: photoLengthM, lengthSource: 'scale', crossesZoneIds };
	return { photoLengthM: null, lengthM: null, lengthSource: null, crossesZoneIds };
}

function routeInput(route: BoardRouteInput, g: RouteGeometry): RouteInput {
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
 * record: the engine's "missing" fail for these few fields becomes a "check" with a prompt (the
 * finding keeps its `field` and `missing` flag). Wrong values (out of range, unknown) stay fails.
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

/** A finding about the cable route: a route rule, or an input finding on a route field. */
export function isRouteFinding(f: Pick<Finding, 'rule' | 'field'>): boolean {
	return f.rule.startsWith('route.') || (typeof f.field === 'string' && f.field.startsWith('route.'));
}

export interface PointEvaluation<R extends BoardRouteInput = BoardRouteInput> {
	id: string;
	/** Every rule for the point, its route and the machine, in the engine's order. */
	findings: Finding[];
	worst: Severity;
	distance: DistanceValue;
	/** The route checked with the point (the first drawn from it), or null. */
	route: R | null;
}

export interface RouteEvaluation {
	id: string;
	geometry: RouteGeometry;
	/** The route rules from the point's evaluation (length, keep-out, fixing, voltage). */
	findings: Finding[];
	worst: Severity;
}

export interface ZoneEvaluation {
	id: string;
	/** Cable routes that touch or enter the zone. */
	crossingRouteIds: string[];
}

export interface BoardEvaluation<R extends BoardRouteInput = BoardRouteInput> {
	points: Map<string, PointEvaluation<R>>;
	routes: Map<string, RouteEvaluation>;
	zones: Map<string, ZoneEvaluation>;
	/** Points by their worst severity. */
	counts: Record<Severity, number>;
}

export interface BoardEvaluationContext {
	machine: MachineInput;
	/** The organisation's threshold overrides as stored; bad ones show up as findings. */
	thresholds?: Partial<Thresholds> | Record<string, unknown> | null;
}

/**
 * Checks every point of a board with its first cable route, the route geometry against the
 * keep-out zones and the scale, and the machine-level rules on each point. Never throws on bad
 * content or settings: they come out as findings.
 */
export function evaluateBoard<P extends BoardPointInput, R extends BoardRouteInput, Z extends BoardZoneInput>(
	board: BoardContent<P, R, Z>,
	ctx: BoardEvaluationContext
): BoardEvaluation<R> {
	const routeOf = new Map<string, R>();
	for (const r of board.routes) if (!routeOf.has(r.pointId)) routeOf.set(r.pointId, r);
	const points = new Map<string, PointEvaluation<R>>();
	const routes = new Map<string, RouteEvaluation>();
	const zones = new Map<string, ZoneEvaluation>();
	const counts: Record<Severity, number> = { pass: 0, warn: 0, fail: 0 };

	for (const z of board.zones) zones.set(z.id, { id: z.id, crossingRouteIds: [] });
	for (const r of board.routes) {
		const geometry = routeGeometry(r, board.zones, board.scale);
		routes.set(r.id, { id: r.id, geometry, findings: [], worst: 'pass' });
		for (const zid of geometry.crossesZoneIds) zones.get(zid)?.crossingRouteIds.push(r.id);
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
					material: p.material as never
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
			const rf = findings.filter(isRouteFinding);
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
	return { points, routes, zones, counts };
}

/**
 * One collator for every comparison: `localeCompare` with options sets up a collator on each
 * call, which for sorting a thousand labels takes longer than the rest of the list. Same order.
 */
const labelCollator = new Intl.Collator(undefined, { numeric: true, sensitivity: 'base' });

/** Natural order of labels: P2 before P10. */
export function compareLabels(a: string, b: string): number {
	return labelCollator.compare(a, b);
}
