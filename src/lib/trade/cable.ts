import { requireNumber, requireOneOf } from './validate';

export type ConductorClass = 1 | 2 | 5;

/**
 * IEC 60228, maximum DC resistance of plain annealed copper conductors at 20 °C, Ω/km.
 * Classes 1 and 2 (solid and stranded) share one column here; class 5 is flexible.
 */
export const IEC60228_MAX_RESISTANCE: ReadonlyArray<{
	crossSectionMm2: number;
	class12OhmPerKm: number;
	class5OhmPerKm: number;
}> = [
	{ crossSectionMm2: 0.5, class12OhmPerKm: 36.0, class5OhmPerKm: 39.0 },
	{ crossSectionMm2: 0.75, class12OhmPerKm: 24.5, class5OhmPerKm: 26.0 },
	{ crossSectionMm2: 1.0, class12OhmPerKm: 18.1, class5OhmPerKm: 19.5 },
	{ crossSectionMm2: 1.5, class12OhmPerKm: 12.1, class5OhmPerKm: 13.3 },
	{ crossSectionMm2: 2.5, class12OhmPerKm: 7.41, class5OhmPerKm: 7.98 }
];

export const CONDUCTOR_SIZES_MM2: readonly number[] = IEC60228_MAX_RESISTANCE.map((r) => r.crossSectionMm2);

/** Resistance-temperature coefficient of annealed copper at 20 °C, 1/K (IEC 60028). */
export const COPPER_ALPHA_20 = 0.00393;

/** Resistivity of annealed copper at 20 °C, Ω·mm²/m (IEC 60028). */
export const COPPER_RESISTIVITY_20 = 0.017241;

/** Sensor cables are usually flexible, so class 5 is the default. */
export const DEFAULT_CONDUCTOR_CLASS: ConductorClass = 5;

const SIZE_TOLERANCE = 1e-9;

/** Table lookup of the IEC 60228 maximum at 20 °C, Ω per metre of one conductor. */
export function conductorResistancePerMetre(
	crossSectionMm2: number,
	conductorClass: ConductorClass = DEFAULT_CONDUCTOR_CLASS,
	temperatureC = 20
): number {
	requireNumber('crossSectionMm2', crossSectionMm2, { min: 0, exclusiveMin: true, unit: 'mm²' });
	requireOneOf('conductorClass', conductorClass, [1, 2, 5] as const);
	requireNumber('temperatureC', temperatureC, { min: -60, max: 200, unit: '°C' });
	const row = IEC60228_MAX_RESISTANCE.find((r) => Math.abs(r.crossSectionMm2 - crossSectionMm2) < SIZE_TOLERANCE);
	if (!row) {
		throw new RangeError(`crossSectionMm2 must be a standard size (${CONDUCTOR_SIZES_MM2.join(', ')} mm²), got ${crossSectionMm2} mm²`);
	}
	const r20 = (conductorClass === 5 ? row.class5OhmPerKm : row.class12OhmPerKm) / 1000;
	// R_t = R_20·(1 + α·(t − 20)), IEC 60028.
	return r20 * (1 + COPPER_ALPHA_20 * (temperatureC - 20));
}

export interface CableRun {
	/** One-way route length, m. The drop counts the go and return conductors. */
	lengthM: number;
	crossSectionMm2: number;
	currentA: number;
	conductorClass?: ConductorClass;
	/** Conductor temperature, °C; 20 °C when omitted. */
	temperatureC?: number;
}

/**
 * DC voltage drop over a two-wire run, V: ΔU = 2·L·I·R′, with R′ the IEC 60228 maximum
 * resistance per metre (a worst case for a conforming cable) corrected for temperature.
 */
export function cableVoltageDrop(c: CableRun): number {
	if (typeof c !== 'object' || c === null) throw new RangeError('cable run must be an object');
	const lengthM = requireNumber('lengthM', c.lengthM, { min: 0, max: 10_000, unit: 'm' });
	const currentA = requireNumber('currentA', c.currentA, { min: 0, max: 100, unit: 'A' });
	const r = conductorResistancePerMetre(c.crossSectionMm2, c.conductorClass ?? DEFAULT_CONDUCTOR_CLASS, c.temperatureC ?? 20);
	return 2 * lengthM * currentA * r;
}

/**
 * Longest one-way run, m, that keeps the voltage at the sensor end at or above `minV`.
 * Infinity when the current is zero (no drop).
 */
export function maxCableLength(c: {
	crossSectionMm2: number;
	currentA: number;
	supplyV: number;
	minV: number;
	conductorClass?: ConductorClass;
	temperatureC?: number;
}): number {
	const currentA = requireNumber('currentA', c.currentA, { min: 0, max: 100, unit: 'A' });
	const supplyV = requireNumber('supplyV', c.supplyV, { min: 0, max: 1000, unit: 'V' });
	const minV = requireNumber('minV', c.minV, { min: 0, max: 1000, unit: 'V' });
	const r = conductorResistancePerMetre(c.crossSectionMm2, c.conductorClass ?? DEFAULT_CONDUCTOR_CLASS, c.temperatureC ?? 20);
	if (supplyV < minV) return 0;
	if (currentA === 0) return Infinity;
	return (supplyV - minV) / (2 * currentA * r);
}
