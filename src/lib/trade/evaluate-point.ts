import { cableVoltageDrop, CONDUCTOR_SIZES_MM2, DEFAULT_CONDUCTOR_CLASS, type ConductorClass } from './cable';
import type { Finding } from './findings';
import { BadInput, fmt, InputReader, isBad, isGood, type Read } from './inputs';
import { RULES_BY_ID, type RuleId } from './rules';
import { DEFAULT_THRESHOLDS, safeResolveThresholds, type Thresholds } from './thresholds';

export const SURFACES = ['machined_housing', 'cast_housing', 'solid_casting', 'sheet_cover', 'finned', 'other'] as const;
export const MOUNTINGS = ['stud', 'bonded_pad', 'magnet'] as const;
export const MATERIALS = ['steel', 'cast_iron', 'aluminium'] as const;
export const SPEED_MODES = ['constant', 'variable'] as const;

export type Surface = (typeof SURFACES)[number];
export type Mounting = (typeof MOUNTINGS)[number];
export type Material = (typeof MATERIALS)[number];
export type SpeedMode = (typeof SPEED_MODES)[number];

/** Nominal diameter of the M6 mounting stud, mm (ISO 261). */
export const STUD_DIAMETER_MM = 6;

/**
 * The M6 coarse thread the mounting stud screws into: pitch 1.0 mm (ISO 261/262), minor
 * diameter 4.917 mm (ISO 724), tap drill 5.0 mm (common tables after ISO 2306: nominal
 * diameter minus pitch).
 */
export const STUD_THREAD = Object.freeze({
	designation: 'M6',
	nominalDiameterMm: STUD_DIAMETER_MM,
	pitchMm: 1.0,
	minorDiameterMm: 4.917,
	tapDrillMm: 5.0
});

export const SURFACE_LABEL: Readonly<Record<Surface, string>> = {
	machined_housing: 'machined bearing housing',
	cast_housing: 'cast bearing housing',
	solid_casting: 'solid casting',
	sheet_cover: 'sheet-metal cover or guard',
	finned: 'finned or ribbed surface',
	other: 'other surface'
};

export const MOUNTING_LABEL: Readonly<Record<Mounting, string>> = {
	stud: 'tapped stud',
	bonded_pad: 'bonded mounting pad',
	magnet: 'magnet'
};

export const MATERIAL_LABEL: Readonly<Record<Material, string>> = {
	steel: 'steel',
	cast_iron: 'cast iron',
	aluminium: 'aluminium'
};

export interface MachineInput {
	speedRpm: number;
	speedMode: SpeedMode;
	hasSpeedSignal: boolean;
	hazardousArea: boolean;
}

export interface PointInput {
	surface: Surface;
	mounting: Mounting;
	flatDiameterMm?: number | null;
	wallThicknessMm?: number | null;
	distanceToBearingMm?: number | null;
	surfaceTempC?: number | null;
	/** Housing material, for thread engagement with a stud. */
	material?: Material | null;
	/** Survey points are permanent unless marked temporary. */
	purpose?: 'permanent' | 'temporary' | null;
}

export interface RouteInput {
	/** One-way length from the point to the supply point, m. */
	lengthM: number;
	crossSectionMm2: number;
	/** Sensor draw, A; the `sensorCurrentA` threshold when omitted. */
	currentA?: number | null;
	/** Voltage measured at the supply point, V; the nominal voltage is assumed when omitted. */
	supplyV?: number | null;
	crossesKeepOut: boolean;
	conductorClass?: ConductorClass | null;
	/** Conductor temperature along the run, °C; 20 °C when omitted. */
	temperatureC?: number | null;
	/** Whether the cable will be fixed along the route (clips, ties). */
	fixed?: boolean | null;
}

export interface PointEvaluationInput {
	machine: MachineInput;
	point: PointInput;
	route?: RouteInput | null;
}

export function finding(
	rule: RuleId,
	severity: Finding['severity'],
	message: string,
	extra: { value?: number; limit?: number } = {}
): Finding {
	const f: Finding = { rule, severity, message, reference: RULES_BY_ID[rule].reference };
	if (extra.value !== undefined) f.value = extra.value;
	if (extra.limit !== undefined) f.limit = extra.limit;
	return f;
}

/** Reads and validates the machine fields the rules use. */
export function readMachine(r: InputReader, machine: unknown, path = 'machine') {
	const m = r.object(path, 'Machine details', machine, true);
	if (!isGood(m)) return undefined;
	return {
		speedRpm: r.number(`${path}.speedRpm`, 'Machine speed', m.speedRpm, {
			min: 0,
			exclusiveMin: true,
			max: 100_000,
			unit: 'r/min',
			required: true
		}),
		speedMode: r.choice(`${path}.speedMode`, 'Speed mode', m.speedMode, SPEED_MODES, true),
		hasSpeedSignal: r.flag(`${path}.hasSpeedSignal`, 'Speed signal available', m.hasSpeedSignal, true),
		hazardousArea: r.flag(`${path}.hazardousArea`, 'Hazardous area', m.hazardousArea, true)
	};
}

export type ReadMachine = NonNullable<ReturnType<typeof readMachine>>;

export function machineFindings(m: ReadMachine, t: Thresholds): Finding[] {
	const out: Finding[] = [];
	if (isGood(m.speedRpm)) {
		out.push(
			m.speedRpm < t.minSpeedRpm
				? finding(
						'machine.speed',
						'warn',
						`Low-speed machine: ${fmt(m.speedRpm, 0)} r/min is below ${fmt(t.minSpeedRpm, 0)} r/min. Standard sensors may not see its faults; agree a low-frequency sensor and longer measurements with the vibration engineer.`,
						{ value: m.speedRpm, limit: t.minSpeedRpm }
					)
				: finding('machine.speed', 'pass', `${fmt(m.speedRpm, 0)} r/min suits standard sensors (${fmt(t.minSpeedRpm, 0)} r/min or more).`, {
						value: m.speedRpm,
						limit: t.minSpeedRpm
					})
		);
	}
	if (isGood(m.speedMode) && isGood(m.hasSpeedSignal)) {
		if (m.speedMode === 'variable' && !m.hasSpeedSignal) {
			out.push(
				finding(
					'machine.speed-signal',
					'warn',
					'Variable-speed machine without a speed signal. Wire in a speed signal (tachometer or drive output) so readings taken at different speeds can be compared.'
				)
			);
		} else {
			out.push(
				finding(
					'machine.speed-signal',
					'pass',
					m.speedMode === 'variable' ? 'Variable-speed machine with a speed signal.' : 'Constant-speed machine: no speed signal needed.'
				)
			);
		}
	}
	if (isGood(m.hazardousArea)) {
		out.push(
			m.hazardousArea
				? finding(
						'machine.hazardous-area',
						'warn',
						'Hazardous (explosive) area: the sensor, cable and connectors must be certified for the zone, and the work needs a permit. Follow the site rules and local codes.'
					)
				: finding('machine.hazardous-area', 'pass', 'Not marked as a hazardous area.')
		);
	}
	return out;
}

export function readPoint(r: InputReader, point: unknown, path = 'point') {
	const p = r.object(path, 'Point details', point, true);
	if (!isGood(p)) return undefined;
	return {
		surface: r.choice(`${path}.surface`, 'Surface', p.surface, SURFACES, true),
		mounting: r.choice(`${path}.mounting`, 'Mounting', p.mounting, MOUNTINGS, true),
		flatDiameterMm: r.number(`${path}.flatDiameterMm`, 'Flat seat diameter', p.flatDiameterMm, { min: 0, max: 1000, unit: 'mm' }),
		wallThicknessMm: r.number(`${path}.wallThicknessMm`, 'Wall thickness', p.wallThicknessMm, { min: 0, max: 500, unit: 'mm' }),
		distanceToBearingMm: r.number(`${path}.distanceToBearingMm`, 'Distance to bearing', p.distanceToBearingMm, {
			min: 0,
			max: 5000,
			unit: 'mm'
		}),
		surfaceTempC: r.number(`${path}.surfaceTempC`, 'Surface temperature', p.surfaceTempC, { min: -100, max: 600, unit: '°C' }),
		material: r.choice(`${path}.material`, 'Housing material', p.material, MATERIALS, false),
		purpose: r.choice(`${path}.purpose`, 'Purpose', p.purpose, ['permanent', 'temporary'] as const, false)
	};
}

export type ReadPoint = NonNullable<ReturnType<typeof readPoint>>;

function surfaceFinding(surface: Surface): Finding {
	switch (surface) {
		case 'sheet_cover':
			return finding(
				'surface.solid-metal',
				'fail',
				'On a sheet-metal cover or guard, which vibrates on its own. Move the point to the bearing housing or pedestal underneath.'
			);
		case 'finned':
			return finding(
				'surface.solid-metal',
				'fail',
				'On cooling fins or ribs, which damp and distort the signal. Move the point to solid metal on the bearing housing.'
			);
		case 'other':
			return finding(
				'surface.solid-metal',
				'warn',
				'Surface type is "other": confirm it is solid metal (bearing housing, pedestal or solid casting), not a cover, guard or fin.'
			);
		default:
			return finding('surface.solid-metal', 'pass', `On solid metal (${SURFACE_LABEL[surface]}).`);
	}
}

function engagementFactor(material: Material, t: Thresholds): number {
	if (material === 'steel') return t.threadEngagementSteel;
	if (material === 'cast_iron') return t.threadEngagementCastIron;
	return t.threadEngagementAluminium;
}

export interface StudHoleRequirement {
	/** Thread designation, e.g. "M6". */
	thread: string;
	/** Tap drill diameter, mm. */
	tapDrillMm: number;
	/** Engagement the housing material needs (factor × d), mm; null while the material is unknown. */
	engagementMm: number | null;
	/** Engagement factor (× d) for the material; null while it is unknown. */
	engagementFactor: number | null;
	/** Full-thread depth to tap: the engagement, never less than the minimum thread depth, mm. */
	threadMm: number;
	/** Drilled hole depth: the thread plus the run-out margin (hole minus thread of the defaults), mm. */
	holeMm: number;
	/** Wall thickness the hole needs, mm (equal to the hole depth: a blind hole must not break through). */
	wallMm: number;
}

/**
 * Tapped hole for the M6 stud in a housing material: thread, tap drill, engagement, thread
 * and hole depth. The hole runs deeper than the thread by the default margin (hole depth
 * minus thread depth of the thresholds) to leave room for the tap's lead and swarf.
 */
export function studHoleRequirement(material: Material | null | undefined, t: Thresholds = DEFAULT_THRESHOLDS): StudHoleRequirement {
	const margin = t.minWallThicknessStudMm - t.minThreadDepthMm;
	const factor = material ? engagementFactor(material, t) : null;
	const engagementMm = factor === null ? null : factor * STUD_DIAMETER_MM;
	const threadMm = engagementMm === null ? t.minThreadDepthMm : Math.max(t.minThreadDepthMm, engagementMm);
	return {
		thread: STUD_THREAD.designation,
		tapDrillMm: STUD_THREAD.tapDrillMm,
		engagementMm,
		engagementFactor: factor,
		threadMm,
		holeMm: threadMm + margin,
		wallMm: threadMm + margin
	};
}

export function pointFindings(p: ReadPoint, t: Thresholds): Finding[] {
	const out: Finding[] = [];
	if (isGood(p.surface)) out.push(surfaceFinding(p.surface));

	// Seat size applies to every mounting: a stud, a pad and a magnet all need a flat seat.
	if (p.flatDiameterMm === undefined) {
		out.push(
			finding(
				'seat.flat-diameter',
				'warn',
				`Measure the flat area available for the seat (diameter in mm); it must be at least ${fmt(t.minFlatDiameterMm)} mm.`,
				{ limit: t.minFlatDiameterMm }
			)
		);
	} else if (isGood(p.flatDiameterMm)) {
		out.push(
			p.flatDiameterMm < t.minFlatDiameterMm
				? finding(
						'seat.flat-diameter',
						'fail',
						`Only ${fmt(p.flatDiameterMm)} mm of flat seat; the sensor base needs at least ${fmt(t.minFlatDiameterMm)} mm. Spot-face a larger seat if the metal allows it, or move the point.`,
						{ value: p.flatDiameterMm, limit: t.minFlatDiameterMm }
					)
				: finding(
						'seat.flat-diameter',
						'pass',
						`${fmt(p.flatDiameterMm)} mm of flat seat (at least ${fmt(t.minFlatDiameterMm)} mm needed).`,
						{
							value: p.flatDiameterMm,
							limit: t.minFlatDiameterMm
						}
					)
		);
	}

	if (p.mounting === 'stud') {
		const base = studHoleRequirement(undefined, t);
		if (p.wallThicknessMm === undefined) {
			out.push(
				finding(
					'hole.wall-thickness',
					'warn',
					`Measure the wall thickness at the seat (ultrasonic gauge or drawing): a tapped M6 hole needs ${fmt(t.minWallThicknessStudMm)} mm of wall. If it cannot be measured, bond a mounting pad instead.`,
					{ limit: t.minWallThicknessStudMm }
				)
			);
		} else if (isGood(p.wallThicknessMm)) {
			out.push(
				p.wallThicknessMm < t.minWallThicknessStudMm
					? finding(
							'hole.wall-thickness',
							'fail',
							`Wall is only ${fmt(p.wallThicknessMm)} mm; a tapped M6 stud hole needs ${fmt(t.minWallThicknessStudMm)} mm (${fmt(t.minThreadDepthMm)} mm of thread). Do not drill: bond a mounting pad instead.`,
							{ value: p.wallThicknessMm, limit: t.minWallThicknessStudMm }
						)
					: finding(
							'hole.wall-thickness',
							'pass',
							`${fmt(p.wallThicknessMm)} mm wall takes a tapped hole ${fmt(base.holeMm)} mm deep with ${fmt(base.threadMm)} mm of thread.`,
							{ value: p.wallThicknessMm, limit: t.minWallThicknessStudMm }
						)
			);
		}

		if (p.material === undefined) {
			const alu = studHoleRequirement('aluminium', t);
			out.push(
				finding(
					'hole.thread-engagement',
					'warn',
					`Record the housing material. Steel and cast iron are covered by ${fmt(t.minThreadDepthMm)} mm of thread; in aluminium an M6 stud needs ${fmt(alu.threadMm)} mm of thread and a wall of ${fmt(alu.wallMm)} mm.`
				)
			);
		} else if (isGood(p.material)) {
			const need = studHoleRequirement(p.material, t);
			const factor = engagementFactor(p.material, t);
			const what = `In ${MATERIAL_LABEL[p.material]} an M6 stud needs ${fmt(need.threadMm)} mm of thread (${fmt(factor, 2)} × d, at least ${fmt(t.minThreadDepthMm)} mm), so a hole ${fmt(need.holeMm)} mm deep`;
			if (p.wallThicknessMm === undefined) {
				out.push(finding('hole.thread-engagement', 'warn', `${what}: measure the wall thickness.`, { limit: need.wallMm }));
			} else if (isGood(p.wallThicknessMm)) {
				out.push(
					p.wallThicknessMm < need.wallMm
						? finding(
								'hole.thread-engagement',
								'fail',
								`${what}; the ${fmt(p.wallThicknessMm)} mm wall is too thin. Bond a mounting pad instead.`,
								{
									value: p.wallThicknessMm,
									limit: need.wallMm
								}
							)
						: finding('hole.thread-engagement', 'pass', `${what}; the ${fmt(p.wallThicknessMm)} mm wall is enough.`, {
								value: p.wallThicknessMm,
								limit: need.wallMm
							})
				);
			}
		}
	}

	if (p.mounting === 'magnet' && !isBad(p.purpose)) {
		out.push(
			p.purpose === 'temporary'
				? finding('mounting.magnet-temporary', 'pass', 'Magnet mount on a temporary point.')
				: finding(
						'mounting.magnet-temporary',
						'warn',
						'Magnet mounts are for temporary surveys. For a permanent point use a tapped stud, or a bonded pad where the wall is thin.'
					)
		);
	}

	if (p.distanceToBearingMm === undefined) {
		out.push(
			finding(
				'distance.bearing',
				'warn',
				`Measure the distance from the seat to the bearing (mm), or measure it on a calibrated board. Keep it within ${fmt(t.distanceWarnMm)} mm.`,
				{ limit: t.distanceWarnMm }
			)
		);
	} else if (isGood(p.distanceToBearingMm)) {
		const d = p.distanceToBearingMm;
		// "Above" the limit: a point exactly at the limit is still inside it.
		if (d > t.distanceFailMm) {
			out.push(
				finding(
					'distance.bearing',
					'fail',
					`${fmt(d)} mm from the bearing, more than ${fmt(t.distanceFailMm)} mm. Move the point onto the bearing housing, as close to the load zone as possible.`,
					{ value: d, limit: t.distanceFailMm }
				)
			);
		} else if (d > t.distanceWarnMm) {
			out.push(
				finding(
					'distance.bearing',
					'warn',
					`${fmt(d)} mm from the bearing, more than ${fmt(t.distanceWarnMm)} mm. Look for a spot closer to the bearing load zone.`,
					{ value: d, limit: t.distanceWarnMm }
				)
			);
		} else {
			out.push(
				finding('distance.bearing', 'pass', `${fmt(d)} mm from the bearing (within ${fmt(t.distanceWarnMm)} mm).`, {
					value: d,
					limit: t.distanceWarnMm
				})
			);
		}
	}

	if (p.surfaceTempC === undefined) {
		out.push(
			finding(
				'surface.temperature',
				'warn',
				`Measure the surface temperature at the seat with the machine running and at normal load (contact or infrared thermometer); limit ${fmt(t.maxSurfaceTempC)} °C.`,
				{ limit: t.maxSurfaceTempC }
			)
		);
	} else if (isGood(p.surfaceTempC)) {
		out.push(
			p.surfaceTempC > t.maxSurfaceTempC
				? finding(
						'surface.temperature',
						'fail',
						`Surface at ${fmt(p.surfaceTempC)} °C is above the ${fmt(t.maxSurfaceTempC)} °C limit. Choose a cooler spot or a sensor rated for the temperature. Hot surface: wear gloves.`,
						{ value: p.surfaceTempC, limit: t.maxSurfaceTempC }
					)
				: finding('surface.temperature', 'pass', `Surface at ${fmt(p.surfaceTempC)} °C (limit ${fmt(t.maxSurfaceTempC)} °C).`, {
						value: p.surfaceTempC,
						limit: t.maxSurfaceTempC
					})
		);
	}
	return out;
}

export function readRoute(r: InputReader, route: unknown, path = 'route') {
	const o = r.object(path, 'Cable route details', route, false);
	if (!isGood(o)) return o as Read<never>;
	return {
		lengthM: r.number(`${path}.lengthM`, 'Route length', o.lengthM, { min: 0, max: 10_000, unit: 'm', required: true }),
		crossSectionMm2: r.number(`${path}.crossSectionMm2`, 'Conductor cross-section', o.crossSectionMm2, {
			min: 0,
			exclusiveMin: true,
			max: 1000,
			unit: 'mm²',
			required: true
		}),
		currentA: r.number(`${path}.currentA`, 'Sensor current', o.currentA, { min: 0, max: 100, unit: 'A' }),
		supplyV: r.number(`${path}.supplyV`, 'Supply voltage', o.supplyV, { min: 0, max: 1000, unit: 'V' }),
		crossesKeepOut: r.flag(`${path}.crossesKeepOut`, 'Keep-out crossing', o.crossesKeepOut, true),
		conductorClass: r.choice(`${path}.conductorClass`, 'Conductor class', o.conductorClass, [1, 2, 5] as const, false),
		temperatureC: r.number(`${path}.temperatureC`, 'Cable temperature', o.temperatureC, { min: -60, max: 200, unit: '°C' }),
		fixed: r.flag(`${path}.fixed`, 'Cable fixed along the route', o.fixed, false)
	};
}

type ReadRoute = Exclude<ReturnType<typeof readRoute>, undefined | BadInput>;

function supplyFinding(route: ReadRoute, t: Thresholds): Finding | undefined {
	const { lengthM, crossSectionMm2, currentA, supplyV, conductorClass, temperatureC } = route;
	if (!isGood(lengthM) || !isGood(crossSectionMm2)) return undefined;
	if (isBad(currentA) || isBad(supplyV) || isBad(conductorClass) || isBad(temperatureC)) return undefined;
	if (!CONDUCTOR_SIZES_MM2.some((s) => Math.abs(s - crossSectionMm2) < 1e-9)) {
		return finding(
			'route.supply-voltage',
			'warn',
			`${fmt(crossSectionMm2, 2)} mm² is not a size in the conductor table; choose ${CONDUCTOR_SIZES_MM2.join(', ')} mm² so the voltage drop can be checked.`
		);
	}
	const cls = conductorClass ?? DEFAULT_CONDUCTOR_CLASS;
	const amps = currentA ?? t.sensorCurrentA;
	const volts = supplyV ?? t.nominalSupplyV;
	const temp = temperatureC ?? 20;
	const drop = cableVoltageDrop({ lengthM, crossSectionMm2, currentA: amps, conductorClass: cls, temperatureC: temp });
	const atSensor = volts - drop;
	const run = `${fmt(lengthM)} m of ${fmt(crossSectionMm2, 2)} mm² at ${fmt(amps, 3)} A drops ${fmt(drop, 2)} V`;
	if (volts > t.supplyMaxV) {
		return finding(
			'route.supply-voltage',
			'fail',
			`The supply is ${fmt(volts, 1)} V, above the ${fmt(t.supplyMaxV, 1)} V maximum. Have the supply checked by a qualified person before connecting.`,
			{ value: volts, limit: t.supplyMaxV }
		);
	}
	if (atSensor < t.supplyMinV) {
		const ok = CONDUCTOR_SIZES_MM2.find(
			(s) =>
				volts - cableVoltageDrop({ lengthM, crossSectionMm2: s, currentA: amps, conductorClass: cls, temperatureC: temp }) >= t.supplyMinV
		);
		const advice = ok && ok > crossSectionMm2 ? `Use ${ok} mm² conductors or a closer supply point.` : 'Use a closer supply point.';
		return finding(
			'route.supply-voltage',
			'fail',
			`Only ${fmt(atSensor, 2)} V reaches the sensor (${fmt(volts, 1)} V supply; ${run}); at least ${fmt(t.supplyMinV, 1)} V is needed. ${advice}`,
			{ value: atSensor, limit: t.supplyMinV }
		);
	}
	if (supplyV === undefined) {
		return finding(
			'route.supply-voltage',
			'warn',
			`Measure the voltage at the supply point. Assuming ${fmt(volts, 1)} V nominal, ${fmt(atSensor, 2)} V reaches the sensor (${run}; at least ${fmt(t.supplyMinV, 1)} V needed).`,
			{ value: atSensor, limit: t.supplyMinV }
		);
	}
	return finding(
		'route.supply-voltage',
		'pass',
		`${fmt(atSensor, 2)} V reaches the sensor (${fmt(volts, 1)} V supply; ${run}; at least ${fmt(t.supplyMinV, 1)} V needed).`,
		{ value: atSensor, limit: t.supplyMinV }
	);
}

export function routeFindings(route: ReturnType<typeof readRoute>, t: Thresholds): Finding[] {
	if (isBad(route)) return [];
	if (route === undefined) {
		return [finding('route.drawn', 'warn', 'No cable route yet. Draw the route from this point to a 24 V DC supply point.')];
	}
	const out: Finding[] = [];
	if (isGood(route.lengthM)) {
		out.push(finding('route.drawn', 'pass', `Cable route drawn, ${fmt(route.lengthM)} m.`, { value: route.lengthM }));
	}
	if (isGood(route.crossesKeepOut)) {
		out.push(
			route.crossesKeepOut
				? finding(
						'route.keep-out',
						'fail',
						'The cable route enters or touches a keep-out zone around a rotating part. Re-route it clear of shafts, couplings, belts and fans.'
					)
				: finding('route.keep-out', 'pass', 'The cable route stays clear of the keep-out zones.')
		);
	}
	if (route.fixed === true) out.push(finding('route.fixing', 'pass', 'Cable to be fixed along the route.'));
	if (route.fixed === false) {
		out.push(
			finding(
				'route.fixing',
				'warn',
				'The cable is not fixed along the route. Plan clips or ties so it cannot swing or reach rotating parts.'
			)
		);
	}
	const supply = supplyFinding(route, t);
	if (supply) out.push(supply);
	return out;
}

/**
 * Resolves threshold overrides. Bad overrides become 'fail' findings and the defaults are
 * used for the rest of the evaluation, so the result is never better than "fail".
 *
 * A board evaluates every point with the same overrides object, so the resolution is kept per
 * object (checking the overrides is a schema parse): the thresholds come back frozen and the
 * findings as fresh copies. Overrides are read, never changed, by the rule engine; a caller that
 * changes an overrides object after evaluating with it must pass a new object.
 */
const resolved = new WeakMap<object, { t: Thresholds; findings: Finding[] }>();
let resolvedDefault: { t: Thresholds; findings: Finding[] } | null = null;

function resolveForEvaluation(overrides: unknown): { t: Thresholds; findings: Finding[] } {
	const r = safeResolveThresholds(overrides ?? {});
	if (r.ok) return { t: Object.freeze(r.thresholds), findings: [] };
	return {
		t: Object.freeze({ ...DEFAULT_THRESHOLDS }),
		findings: r.issues.map((i) => ({
			rule: 'input.invalid',
			severity: 'fail' as const,
			message: `Rule setting ${i.key}: ${i.message}. Default thresholds used until it is corrected.`,
			reference: RULES_BY_ID['input.invalid'].reference
		}))
	};
}

export function thresholdsForEvaluation(overrides: unknown): { t: Thresholds; findings: Finding[] } {
	let hit: { t: Thresholds; findings: Finding[] };
	if (overrides === undefined || overrides === null) hit = resolvedDefault ??= resolveForEvaluation(undefined);
	else if (typeof overrides === 'object') {
		const known = resolved.get(overrides);
		hit = known ?? resolveForEvaluation(overrides);
		if (!known) resolved.set(overrides, hit);
	} else hit = resolveForEvaluation(overrides);
	return { t: hit.t, findings: hit.findings.map((f) => ({ ...f })) };
}

/**
 * Checks one measurement point against the mounting rules, including the machine-level
 * rules (speed, speed signal, hazardous area) so a point's badge reflects them. Never
 * throws: bad or missing input becomes a 'fail' or 'warn' finding.
 */
export function evaluatePoint(input: PointEvaluationInput, thresholds?: Partial<Thresholds>): Finding[] {
	const { t, findings: settingFindings } = thresholdsForEvaluation(thresholds);
	const r = new InputReader();
	const root = r.object('input', 'Point check input', input, true);
	if (!isGood(root)) return [...settingFindings, ...r.findings];
	const machine = readMachine(r, root.machine);
	const point = readPoint(r, root.point);
	const route = readRoute(r, root.route);
	return [
		...settingFindings,
		...r.findings,
		...(point ? pointFindings(point, t) : []),
		...routeFindings(route, t),
		...(machine ? machineFindings(machine, t) : [])
	];
}
