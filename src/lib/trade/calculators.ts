/**
 * Helpers for the team's calculators: defect-frequency lines and their harmonics, which
 * mounting method can see them, and the supply voltage at the end of a cable run. They reuse
 * the formulas and rules of the other trade modules, so a calculator and a survey check never
 * disagree.
 */
import { bearingFrequencies, bearingGeometryIssues, type BearingFrequencies, type BearingGeometry } from './bearing';
import { cableVoltageDrop, DEFAULT_CONDUCTOR_CLASS, type ConductorClass } from './cable';
import { evaluatePoint } from './evaluate-point';
import type { Finding } from './findings';
import { DEFAULT_THRESHOLDS, usableFrequencyHz, type Thresholds } from './thresholds';
import { rpmToHz } from './units';
import { collectIssues, requireNumber } from './validate';

export const DEFECT_KINDS = ['ftf', 'bsf', 'bpfo', 'bpfi'] as const;
export type DefectKind = (typeof DEFECT_KINDS)[number];

export const DEFECT_LABEL: Readonly<Record<DefectKind, string>> = {
	ftf: 'FTF',
	bsf: 'BSF',
	bpfo: 'BPFO',
	bpfi: 'BPFI'
};

export const DEFECT_DESCRIPTION: Readonly<Record<DefectKind, string>> = {
	ftf: 'Fundamental train (cage) frequency',
	bsf: 'Ball (rolling element) spin frequency',
	bpfo: 'Ball pass frequency, outer race',
	bpfi: 'Ball pass frequency, inner race'
};

export const MOUNTING_METHODS = ['stud', 'bonded_pad', 'magnet', 'hand_held'] as const;
export type MountingMethod = (typeof MOUNTING_METHODS)[number];

export const MOUNTING_METHOD_LABEL: Readonly<Record<MountingMethod, string>> = {
	stud: 'Tapped stud',
	bonded_pad: 'Bonded pad',
	magnet: 'Magnet',
	hand_held: 'Hand-held probe'
};

export interface BearingDefects {
	shaftHz: number;
	hz: BearingFrequencies;
	/** The same frequencies as multiples of shaft speed (orders). */
	orders: BearingFrequencies;
}

const SPEED_LIMITS = { min: 0, exclusiveMin: true, max: 120_000, unit: 'r/min' } as const;

/** Every problem with the inputs of `bearingDefects`, one message per bad field. */
export function bearingDefectsIssues(g: unknown, speedRpm: unknown): string[] {
	return [...bearingGeometryIssues(g), ...collectIssues([() => requireNumber('speedRpm', speedRpm, SPEED_LIMITS)])];
}

/** Defect frequencies for a geometry at a speed in r/min; throws a RangeError on bad input. */
export function bearingDefects(g: BearingGeometry, speedRpm: number): BearingDefects {
	requireNumber('speedRpm', speedRpm, SPEED_LIMITS);
	const shaftHz = rpmToHz(speedRpm);
	const hz = bearingFrequencies(g, shaftHz);
	return {
		shaftHz,
		hz,
		orders: { ftf: hz.ftf / shaftHz, bsf: hz.bsf / shaftHz, bpfo: hz.bpfo / shaftHz, bpfi: hz.bpfi / shaftHz }
	};
}

export interface DefectLine {
	kind: DefectKind;
	/** 1 for the fundamental, 2 for the second harmonic, … */
	harmonic: number;
	hz: number;
}

/** Each defect frequency and its harmonics 1…`harmonics`, lowest first. */
export function defectLines(f: BearingFrequencies, harmonics = 3): DefectLine[] {
	requireNumber('harmonics', harmonics, { min: 1, max: 20, integer: true });
	const out: DefectLine[] = [];
	for (const kind of DEFECT_KINDS) {
		for (let h = 1; h <= harmonics; h++) out.push({ kind, harmonic: h, hz: f[kind] * h });
	}
	return out.sort((a, b) => a.hz - b.hz || DEFECT_KINDS.indexOf(a.kind) - DEFECT_KINDS.indexOf(b.kind));
}

export interface MountingCoverage {
	mounting: MountingMethod;
	usableHz: number;
	/** Lines at or below the usable upper frequency. */
	seen: DefectLine[];
	/** Lines above it: this mounting cannot be relied on to see them. */
	missed: DefectLine[];
}

/** For each mounting method, which defect lines fall inside its usable frequency range. */
export function mountingCoverage(lines: readonly DefectLine[], t: Thresholds = DEFAULT_THRESHOLDS): MountingCoverage[] {
	return MOUNTING_METHODS.map((mounting) => {
		const usableHz = usableFrequencyHz(mounting, t);
		return {
			mounting,
			usableHz,
			seen: lines.filter((l) => l.hz <= usableHz),
			missed: lines.filter((l) => l.hz > usableHz)
		};
	});
}

export interface CableSupplyInput {
	/** One-way route length, m. */
	lengthM: number;
	crossSectionMm2: number;
	conductorClass?: ConductorClass;
	currentA: number;
	/** Conductor temperature, °C; 20 °C when omitted. */
	temperatureC?: number;
	/** Voltage at the supply point, V; the nominal voltage is assumed when omitted. */
	supplyV?: number;
}

export interface CableSupplyCheck {
	dropV: number;
	supplyV: number;
	atSensorV: number;
	/** True when no supply voltage was given and the nominal one was assumed. */
	assumedNominal: boolean;
	/** The rule engine's 'route.supply-voltage' finding for the same run. */
	finding: Finding;
}

/** Every problem with the inputs of `cableSupplyCheck`, one message per bad field. */
export function cableSupplyIssues(c: CableSupplyInput, t: Thresholds = DEFAULT_THRESHOLDS): string[] {
	const each = collectIssues([
		() => requireNumber('lengthM', c.lengthM, { min: 0, max: 10_000, unit: 'm' }),
		() => requireNumber('currentA', c.currentA, { min: 0, max: 100, unit: 'A' }),
		() => requireNumber('temperatureC', c.temperatureC ?? 20, { min: -60, max: 200, unit: '°C' }),
		() => c.supplyV === undefined || requireNumber('supplyV', c.supplyV, { min: 0, max: 1000, unit: 'V' })
	]);
	return each.length ? each : collectIssues([() => cableSupplyCheck(c, t)]);
}

/**
 * Voltage drop and voltage at the sensor for a cable run, judged by the same rule the survey
 * board uses. Throws a RangeError naming the field on bad input.
 */
export function cableSupplyCheck(c: CableSupplyInput, t: Thresholds = DEFAULT_THRESHOLDS): CableSupplyCheck {
	if (typeof c !== 'object' || c === null) throw new RangeError('cable run must be an object');
	const conductorClass = c.conductorClass ?? DEFAULT_CONDUCTOR_CLASS;
	const temperatureC = c.temperatureC ?? 20;
	const dropV = cableVoltageDrop({
		lengthM: c.lengthM,
		crossSectionMm2: c.crossSectionMm2,
		currentA: c.currentA,
		conductorClass,
		temperatureC
	});
	const assumedNominal = c.supplyV === undefined;
	const supplyV = assumedNominal ? t.nominalSupplyV : requireNumber('supplyV', c.supplyV, { min: 0, max: 1000, unit: 'V' });
	const route = {
		lengthM: c.lengthM,
		crossSectionMm2: c.crossSectionMm2,
		conductorClass,
		currentA: c.currentA,
		temperatureC,
		crossesKeepOut: false,
		...(assumedNominal ? {} : { supplyV })
	};
	// Only the route part of the point check matters here; the machine and point parts are absent
	// on purpose and their "missing" findings are dropped.
	const finding = evaluatePoint({ route } as unknown as Parameters<typeof evaluatePoint>[0], t).find(
		(f) => f.rule === 'route.supply-voltage'
	);
	if (!finding) throw new RangeError('the supply voltage could not be checked for this cable run');
	return { dropV, supplyV, atSensorV: supplyV - dropV, assumedNominal, finding };
}
