import { requireNumber } from './validate';

/** Standard acceleration of free fall, m/s² (ISO 80000-3). */
export const G_N = 9.80665;

/**
 * Sinusoidal relations only: for a single frequency, v = a/(2πf) and x = v/(2πf).
 * Broadband signals need integration in the frequency domain, not these.
 * Amplitudes are magnitudes, so negative values are rejected.
 */
export function velocityFromAcceleration(accelMS2: number, freqHz: number): number {
	requireNumber('accelMS2', accelMS2, { min: 0, unit: 'm/s²' });
	requireNumber('freqHz', freqHz, { min: 0, exclusiveMin: true, unit: 'Hz' });
	return accelMS2 / (2 * Math.PI * freqHz);
}

export function displacementFromVelocity(velocityMS: number, freqHz: number): number {
	requireNumber('velocityMS', velocityMS, { min: 0, unit: 'm/s' });
	requireNumber('freqHz', freqHz, { min: 0, exclusiveMin: true, unit: 'Hz' });
	return velocityMS / (2 * Math.PI * freqHz);
}

export function accelerationFromVelocity(velocityMS: number, freqHz: number): number {
	requireNumber('velocityMS', velocityMS, { min: 0, unit: 'm/s' });
	requireNumber('freqHz', freqHz, { min: 0, exclusiveMin: true, unit: 'Hz' });
	return velocityMS * 2 * Math.PI * freqHz;
}

export function gToMS2(g: number): number {
	requireNumber('g', g);
	return g * G_N;
}

export function ms2ToG(accelMS2: number): number {
	requireNumber('accelMS2', accelMS2);
	return accelMS2 / G_N;
}

/** r.m.s. of a sine from its peak amplitude: peak/√2. */
export function rmsFromPeak(peak: number): number {
	requireNumber('peak', peak, { min: 0 });
	return peak / Math.SQRT2;
}

export function peakFromRms(rms: number): number {
	requireNumber('rms', rms, { min: 0 });
	return rms * Math.SQRT2;
}

export function peakToPeakFromPeak(peak: number): number {
	requireNumber('peak', peak, { min: 0 });
	return 2 * peak;
}

export function msToMmS(velocityMS: number): number {
	requireNumber('velocityMS', velocityMS);
	return velocityMS * 1000;
}

export function mmSToMs(velocityMmS: number): number {
	requireNumber('velocityMmS', velocityMmS);
	return velocityMmS / 1000;
}

export function rpmToHz(rpm: number): number {
	requireNumber('rpm', rpm, { min: 0 });
	return rpm / 60;
}

export function hzToRpm(hz: number): number {
	requireNumber('hz', hz, { min: 0 });
	return hz * 60;
}

// ---------------------------------------------------------------------------------------------
// Units a person reads and types in. Everything is stored in SI (mm, mm/s, °C, m, N·m); these
// turn a stored value into the person's unit for display and a typed value back into SI.

/** Exact by definition: 1 in = 25.4 mm (NIST SP 811, 2008, B.8; the 1959 international inch). */
export const MM_PER_INCH = 25.4;
/** Exact by definition: 1 ft = 0.3048 m (NIST SP 811, 2008, B.8; the 1959 international foot). */
export const M_PER_FOOT = 0.3048;
/** 1 lbf·ft = 1.355 818 N·m (NIST SP 811, 2008, B.8, "foot pound-force" to newton meter). */
export const NM_PER_LBF_FT = 1.3558179483;

export const UNIT_SYSTEMS = ['metric', 'us'] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];
export const UNIT_SYSTEM_LABEL: Record<UnitSystem, string> = {
	metric: 'Metric (mm, mm/s, °C, m, N·m)',
	us: 'US customary (in, in/s, °F, ft, lbf·ft)'
};

export function isUnitSystem(v: unknown): v is UnitSystem {
	return v === 'metric' || v === 'us';
}

export function mmToIn(mm: number): number {
	requireNumber('mm', mm);
	return mm / MM_PER_INCH;
}

export function inToMm(inches: number): number {
	requireNumber('in', inches);
	return inches * MM_PER_INCH;
}

export function mmSToInS(mmS: number): number {
	requireNumber('mmS', mmS);
	return mmS / MM_PER_INCH;
}

export function inSToMmS(inS: number): number {
	requireNumber('inS', inS);
	return inS * MM_PER_INCH;
}

export function mToFt(m: number): number {
	requireNumber('m', m);
	return m / M_PER_FOOT;
}

export function ftToM(ft: number): number {
	requireNumber('ft', ft);
	return ft * M_PER_FOOT;
}

/** °F = °C × 9/5 + 32 (a temperature, not a difference). */
export function cToF(c: number): number {
	requireNumber('c', c);
	return (c * 9) / 5 + 32;
}

export function fToC(f: number): number {
	requireNumber('f', f);
	return ((f - 32) * 5) / 9;
}

export function nmToLbfFt(nm: number): number {
	requireNumber('nm', nm);
	return nm / NM_PER_LBF_FT;
}

export function lbfFtToNm(lbfFt: number): number {
	requireNumber('lbfFt', lbfFt);
	return lbfFt * NM_PER_LBF_FT;
}

/** What a value measures, which decides its unit in each system. */
export type Quantity = 'length' | 'velocity' | 'temperature' | 'cable' | 'torque';

interface QuantityUnits {
	/** The stored (SI) unit and the US customary one. */
	unit: Record<UnitSystem, string>;
	toUs: (si: number) => number;
	fromUs: (us: number) => number;
	/**
	 * A value typed in US units is rounded to this many decimals of the SI unit, and a value is
	 * shown in US units with `usDecimals` decimals. The pair is chosen so that the display error
	 * stays below half a step of the SI rounding: a stored value on that step comes back exactly
	 * when a form is saved unchanged.
	 */
	siDecimals: number;
	usDecimals: number;
	metricDecimals: number;
}

export const QUANTITY_UNITS: Readonly<Record<Quantity, QuantityUnits>> = {
	// 5 decimals of an inch: ≤ 0.000127 mm off, below half of 0.001 mm.
	length: { unit: { metric: 'mm', us: 'in' }, toUs: mmToIn, fromUs: inToMm, siDecimals: 3, usDecimals: 5, metricDecimals: 3 },
	velocity: { unit: { metric: 'mm/s', us: 'in/s' }, toUs: mmSToInS, fromUs: inSToMmS, siDecimals: 3, usDecimals: 5, metricDecimals: 3 },
	// 0.001 °F = 0.00056 °C, below half of 0.01 °C.
	temperature: { unit: { metric: '°C', us: '°F' }, toUs: cToF, fromUs: fToC, siDecimals: 2, usDecimals: 3, metricDecimals: 2 },
	// 0.0001 ft = 0.00003 m, below half of 0.001 m.
	cable: { unit: { metric: 'm', us: 'ft' }, toUs: mToFt, fromUs: ftToM, siDecimals: 3, usDecimals: 4, metricDecimals: 3 },
	// 0.0001 lbf·ft = 0.000136 N·m, below half of 0.001 N·m.
	torque: { unit: { metric: 'N·m', us: 'lbf·ft' }, toUs: nmToLbfFt, fromUs: lbfFtToNm, siDecimals: 3, usDecimals: 4, metricDecimals: 3 }
};

/** The unit a person sees for a quantity: "mm" or "in", "°C" or "°F", … */
export function unitLabel(q: Quantity, system: UnitSystem): string {
	return QUANTITY_UNITS[q].unit[system];
}

/** The quantity a stored SI unit stands for, or null for units that are the same in both systems (V, Hz, r/min, …). */
export function quantityOfUnit(siUnit: string): Quantity | null {
	for (const [q, u] of Object.entries(QUANTITY_UNITS) as [Quantity, QuantityUnits][]) if (u.unit.metric === siUnit) return q;
	return null;
}

function roundTo(n: number, decimals: number): number {
	const f = 10 ** decimals;
	const r = Math.round(n * f) / f;
	return Object.is(r, -0) ? 0 : r;
}

/** A stored SI value in the person's unit (unrounded). */
export function toUserUnit(q: Quantity, si: number, system: UnitSystem): number {
	requireNumber(q, si);
	return system === 'us' ? QUANTITY_UNITS[q].toUs(si) : si;
}

/**
 * A value in the person's unit back to SI. From US units the result is rounded to the SI step of
 * the quantity, so "1.1811 in" is stored as 30 mm rather than 29.99994 mm.
 */
export function fromUserUnit(q: Quantity, value: number, system: UnitSystem): number {
	requireNumber(q, value);
	if (system === 'metric') return value;
	const u = QUANTITY_UNITS[q];
	return roundTo(u.fromUs(value), u.siDecimals);
}

/**
 * The text a form field shows for a stored value: in the person's unit, no trailing zeros,
 * "." as the decimal mark (what the parser reads back). Empty for a missing value.
 */
export function formatInput(q: Quantity, si: number | null | undefined, system: UnitSystem): string {
	if (si === null || si === undefined || !Number.isFinite(si)) return '';
	const u = QUANTITY_UNITS[q];
	const v = roundTo(toUserUnit(q, si, system), system === 'us' ? u.usDecimals : u.metricDecimals);
	return String(v);
}

/** A stored value for reading, with its unit: "30 mm", "1.18 in", "176 °F". */
export function formatQuantity(q: Quantity, si: number, system: UnitSystem, digits = 2): string {
	if (!Number.isFinite(si)) return '–';
	const v = roundTo(toUserUnit(q, si, system), digits);
	const s = String(v);
	return `${s.startsWith('-') ? `−${s.slice(1)}` : s} ${unitLabel(q, system)}`;
}

export type ParsedQuantity = { ok: true; si: number | null } | { ok: false; message: string };

/**
 * Reads what a person typed in their unit: "12.5", "12,5" (comma decimals from tablets in many
 * locales), with or without the unit after it. Empty gives null (no value). Returns the SI value.
 */
export function parseQuantity(q: Quantity, raw: string, system: UnitSystem, label = 'The value'): ParsedQuantity {
	const unit = unitLabel(q, system);
	let text = raw.trim();
	if (text === '') return { ok: true, si: null };
	if (text.toLowerCase().endsWith(unit.toLowerCase())) text = text.slice(0, -unit.length).trim();
	text = text.replace(/^[−–]/, '-');
	if (/^-?\d+,\d+$/.test(text)) text = text.replace(',', '.');
	if (!/^-?(\d+\.?\d*|\.\d+)(e-?\d+)?$/i.test(text)) return { ok: false, message: `${label} must be a number in ${unit}.` };
	const n = Number(text);
	if (!Number.isFinite(n)) return { ok: false, message: `${label} must be a number in ${unit}.` };
	return { ok: true, si: fromUserUnit(q, n, system) };
}

const SI_IN_TEXT = /(^|[^\d.])([−-]?\d+(?:\.\d+)?) ?(mm\/s|mm|°C|N·m|m)(?![\w/²³])/g;

/**
 * A message that names SI values ("must be at most 10000 m, got 3048 m") restated in the
 * person's units, so an error reads in the unit they typed. Metric text is returned as is.
 */
export function restateInUserUnits(text: string, system: UnitSystem, digits = 3): string {
	if (system === 'metric') return text;
	return text.replace(SI_IN_TEXT, (_, lead: string, num: string, unit: string) => {
		const q = quantityOfUnit(unit);
		const n = Number(num.replace('−', '-'));
		return q && Number.isFinite(n) ? `${lead}${formatQuantity(q, n, system, digits)}` : `${lead}${num} ${unit}`;
	});
}
