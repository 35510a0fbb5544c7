import { z } from 'zod';

export type Firmness = 'published' | 'common practice' | 'from memory';

/**
 * Organisation-adjustable limits used by the rule engine. Lengths in mm, speeds in r/min,
 * temperatures in °C, voltages in V, currents in A, torques in N·m, times in minutes,
 * frequencies in Hz.
 */
export interface Thresholds {
	minFlatDiameterMm: number;
	minWallThicknessStudMm: number;
	minThreadDepthMm: number;
	threadEngagementSteel: number;
	threadEngagementCastIron: number;
	threadEngagementAluminium: number;
	distanceWarnMm: number;
	distanceFailMm: number;
	minSpeedRpm: number;
	maxSurfaceTempC: number;
	supplyMinV: number;
	supplyMaxV: number;
	nominalSupplyV: number;
	sensorCurrentA: number;
	studTorqueLimitNm: number;
	padCureMin: number;
	usableFreqStudHz: number;
	usableFreqPadFraction: number;
	usableFreqMagnetHz: number;
	usableFreqHandHeldHz: number;
	frequencyOfInterestFactor: number;
}

export type ThresholdKey = keyof Thresholds;

export interface ThresholdMeta {
	key: ThresholdKey;
	label: string;
	unit: string;
	default: number;
	/** Validation range, inclusive. */
	min: number;
	max: number;
	/** Suggested input step for forms. */
	step: number;
	firmness: Firmness;
	source: string;
}

export const THRESHOLD_META: readonly ThresholdMeta[] = [
	{
		key: 'minFlatDiameterMm',
		label: 'Smallest flat seat diameter',
		unit: 'mm',
		default: 30,
		min: 5,
		max: 200,
		step: 1,
		firmness: 'common practice',
		source: 'Flat, smooth seat for the sensor base, at least 30 mm across (common practice).'
	},
	{
		key: 'minWallThicknessStudMm',
		label: 'Smallest wall thickness for a tapped stud hole',
		unit: 'mm',
		default: 15,
		min: 5,
		max: 100,
		step: 1,
		firmness: 'common practice',
		source:
			'Tapped hole for an M6 stud: hole depth at least 15 mm, so the wall must be at least 15 mm thick, else bond a pad (common practice).'
	},
	{
		key: 'minThreadDepthMm',
		label: 'Smallest full-thread depth for an M6 stud',
		unit: 'mm',
		default: 9,
		min: 3,
		max: 50,
		step: 0.5,
		firmness: 'common practice',
		source: 'Tapped hole for an M6 stud: thread depth at least 9 mm (common practice).'
	},
	{
		key: 'threadEngagementSteel',
		label: 'Thread engagement in steel',
		unit: '× d',
		default: 1.0,
		min: 0.5,
		max: 4,
		step: 0.05,
		firmness: 'common practice',
		source: 'Thread engagement at least 1.0·d in steel (common practice, machine-design tables).'
	},
	{
		key: 'threadEngagementCastIron',
		label: 'Thread engagement in cast iron',
		unit: '× d',
		default: 1.5,
		min: 0.5,
		max: 4,
		step: 0.05,
		firmness: 'common practice',
		source: 'Thread engagement 1.25–1.5·d in cast iron; the default takes the upper figure (common practice, machine-design tables).'
	},
	{
		key: 'threadEngagementAluminium',
		label: 'Thread engagement in aluminium',
		unit: '× d',
		default: 2.0,
		min: 0.5,
		max: 4,
		step: 0.05,
		firmness: 'common practice',
		source: 'Thread engagement at least 2·d in aluminium (common practice, machine-design tables).'
	},
	{
		key: 'distanceWarnMm',
		label: 'Distance to bearing: check above',
		unit: 'mm',
		default: 75,
		min: 0,
		max: 1000,
		step: 5,
		firmness: 'common practice',
		source: 'As close to the bearing as possible; no standard gives a number, so 75 mm is a configurable default (common practice).'
	},
	{
		key: 'distanceFailMm',
		label: 'Distance to bearing: fail above',
		unit: 'mm',
		default: 150,
		min: 0,
		max: 2000,
		step: 5,
		firmness: 'common practice',
		source: 'As close to the bearing as possible; no standard gives a number, so 150 mm is a configurable default (common practice).'
	},
	{
		key: 'minSpeedRpm',
		label: 'Lowest steady speed for standard sensors',
		unit: 'r/min',
		default: 600,
		min: 1,
		max: 10000,
		step: 10,
		firmness: 'published',
		source:
			'Kim, Tan & Kosse 2008, Australian Journal of Mechanical Engineering 6(1):61–68: standard sensors suit machines at 600 r/min and above.'
	},
	{
		key: 'maxSurfaceTempC',
		label: 'Highest surface temperature at the seat',
		unit: '°C',
		default: 80,
		min: 0,
		max: 400,
		step: 1,
		firmness: 'from memory',
		source: "Below the sensor's rated maximum; 80 °C is a default recalled from memory, set it to the rating of the sensor you fit."
	},
	{
		key: 'supplyMinV',
		label: 'Lowest supply voltage at the sensor',
		unit: 'V',
		default: 20.4,
		min: 0,
		max: 60,
		step: 0.1,
		firmness: 'from memory',
		source: 'IEC 61131-2, 24 V DC supplies: −15 % of nominal (standard published; percentage recalled from memory).'
	},
	{
		key: 'supplyMaxV',
		label: 'Highest supply voltage at the sensor',
		unit: 'V',
		default: 28.8,
		min: 0,
		max: 60,
		step: 0.1,
		firmness: 'from memory',
		source: 'IEC 61131-2, 24 V DC supplies: +20 % of nominal (standard published; percentage recalled from memory).'
	},
	{
		key: 'nominalSupplyV',
		label: 'Nominal supply voltage',
		unit: 'V',
		default: 24,
		min: 1,
		max: 60,
		step: 0.1,
		firmness: 'published',
		source: 'IEC 61131-2: 24 V DC nominal.'
	},
	{
		key: 'sensorCurrentA',
		label: 'Sensor supply current',
		unit: 'A',
		default: 0.03,
		min: 0.001,
		max: 2,
		step: 0.001,
		firmness: 'from memory',
		source: "Typical draw of a 24 V DC online vibration sensor, recalled from memory; use the figure from the sensor's data sheet."
	},
	{
		key: 'studTorqueLimitNm',
		label: 'Stud tightening torque limit',
		unit: 'N·m',
		default: 10,
		min: 0.5,
		max: 50,
		step: 0.5,
		firmness: 'common practice',
		source:
			'As the sensor maker states; 10 N·m is a default limit (common practice). Bolt torque tables (VDI 2230) do not apply to sensor studs.'
	},
	{
		key: 'padCureMin',
		label: 'Mounting pad adhesive cure time',
		unit: 'min',
		default: 15,
		min: 0,
		max: 2880,
		step: 1,
		firmness: 'common practice',
		source: 'Adhesive as the maker says; allow the cure time before loading the pad (default 15 min, common practice).'
	},
	{
		key: 'usableFreqStudHz',
		label: 'Usable upper frequency, stud mount',
		unit: 'Hz',
		default: 10000,
		min: 100,
		max: 50000,
		step: 100,
		firmness: 'from memory',
		source: "Harris' Shock and Vibration Handbook: mounted resonance is highest with a stud (ordering published; figure from memory)."
	},
	{
		key: 'usableFreqPadFraction',
		label: 'Usable upper frequency, bonded pad, as a fraction of stud',
		unit: '× stud',
		default: 0.85,
		min: 0.1,
		max: 0.99,
		step: 0.01,
		firmness: 'from memory',
		source:
			"Harris' Shock and Vibration Handbook: a bonded pad keeps about 80–95 % of the stud range (ordering published; figure from memory)."
	},
	{
		key: 'usableFreqMagnetHz',
		label: 'Usable upper frequency, flat magnet',
		unit: 'Hz',
		default: 5000,
		min: 50,
		max: 50000,
		step: 100,
		firmness: 'from memory',
		source:
			"Harris' Shock and Vibration Handbook: a flat magnet reaches about 5–10 kHz; the default takes the lower figure (ordering published; figure from memory)."
	},
	{
		key: 'usableFreqHandHeldHz',
		label: 'Usable upper frequency, hand-held probe',
		unit: 'Hz',
		default: 1000,
		min: 10,
		max: 20000,
		step: 100,
		firmness: 'from memory',
		source: "Harris' Shock and Vibration Handbook: a hand-held probe reaches about 0.5–2 kHz (ordering published; figure from memory)."
	},
	{
		key: 'frequencyOfInterestFactor',
		label: 'Highest frequency of interest, as a multiple of the highest BPFI',
		unit: '× BPFI',
		default: 3,
		min: 1,
		max: 20,
		step: 0.5,
		firmness: 'common practice',
		source: 'Cover the first harmonics of the inner-race defect frequency: 3 × BPFI by default (common practice).'
	}
];

export const THRESHOLD_KEYS = THRESHOLD_META.map((m) => m.key);

export const DEFAULT_THRESHOLDS: Readonly<Thresholds> = Object.freeze(
	Object.fromEntries(THRESHOLD_META.map((m) => [m.key, m.default])) as unknown as Thresholds
);

export function thresholdMeta(key: ThresholdKey): ThresholdMeta {
	const meta = THRESHOLD_META.find((m) => m.key === key);
	if (!meta) throw new RangeError(`unknown threshold ${JSON.stringify(key)}`);
	return meta;
}

function fieldSchema(m: ThresholdMeta) {
	const unit = ` ${m.unit}`;
	return z
		.number({ error: `${m.label} must be a number` })
		.min(m.min, { error: `${m.label} must be at least ${m.min}${unit}` })
		.max(m.max, { error: `${m.label} must be at most ${m.max}${unit}` })
		.optional();
}

/**
 * Cross-field rules, checked on the overrides merged with the defaults, so an override that
 * breaks an ordering with a default is caught too. Issues are reported on the key the user
 * sent (or on the first key of the pair when both were sent).
 */
function checkConsistency(overrides: Partial<Thresholds>, ctx: z.RefinementCtx) {
	const t: Thresholds = { ...DEFAULT_THRESHOLDS, ...overrides };
	const pathFor = (a: ThresholdKey, b: ThresholdKey) => [a in overrides ? a : b in overrides ? b : a];
	const need = (ok: boolean, a: ThresholdKey, b: ThresholdKey, message: string) => {
		if (!ok) ctx.addIssue({ code: 'custom', path: pathFor(a, b), message });
	};
	need(
		t.distanceWarnMm <= t.distanceFailMm,
		'distanceWarnMm',
		'distanceFailMm',
		`Distance to bearing: the check level (${t.distanceWarnMm} mm) must not be above the fail level (${t.distanceFailMm} mm)`
	);
	need(
		t.minThreadDepthMm <= t.minWallThicknessStudMm,
		'minThreadDepthMm',
		'minWallThicknessStudMm',
		`The thread depth (${t.minThreadDepthMm} mm) cannot exceed the hole depth / wall thickness (${t.minWallThicknessStudMm} mm)`
	);
	need(
		t.supplyMinV < t.nominalSupplyV,
		'supplyMinV',
		'nominalSupplyV',
		`The lowest supply voltage (${t.supplyMinV} V) must be below the nominal voltage (${t.nominalSupplyV} V)`
	);
	need(
		t.nominalSupplyV < t.supplyMaxV,
		'supplyMaxV',
		'nominalSupplyV',
		`The highest supply voltage (${t.supplyMaxV} V) must be above the nominal voltage (${t.nominalSupplyV} V)`
	);
	const padHz = t.usableFreqStudHz * t.usableFreqPadFraction;
	need(
		padHz > t.usableFreqMagnetHz,
		'usableFreqMagnetHz',
		'usableFreqPadFraction',
		`Usable frequency must fall from stud to bonded pad to magnet: the magnet (${t.usableFreqMagnetHz} Hz) must be below the bonded pad (${Math.round(padHz)} Hz)`
	);
	need(
		t.usableFreqMagnetHz > t.usableFreqHandHeldHz,
		'usableFreqHandHeldHz',
		'usableFreqMagnetHz',
		`Usable frequency must fall from magnet to hand-held probe: the hand-held probe (${t.usableFreqHandHeldHz} Hz) must be below the magnet (${t.usableFreqMagnetHz} Hz)`
	);
}

/**
 * Partial overrides as stored in an organisation's settings. Unknown keys are rejected so a
 * typo cannot silently leave a default in force. The bonded-pad figure is a fraction below 1,
 * so a stud always reaches higher than a pad.
 */
export const thresholdsSchema: z.ZodType<Partial<Thresholds>> = z
	.strictObject(
		Object.fromEntries(THRESHOLD_META.map((m) => [m.key, fieldSchema(m)])) as Record<ThresholdKey, ReturnType<typeof fieldSchema>>
	)
	.superRefine((o, ctx) => checkConsistency(o as Partial<Thresholds>, ctx)) as unknown as z.ZodType<Partial<Thresholds>>;

export type ThresholdIssue = { key: string; message: string };

export type ThresholdResolution = { ok: true; thresholds: Thresholds } | { ok: false; issues: ThresholdIssue[] };

/** Merges overrides with the defaults, or lists what is wrong with them. */
export function safeResolveThresholds(overrides: unknown = {}): ThresholdResolution {
	const parsed = thresholdsSchema.safeParse(overrides ?? {});
	if (parsed.success) return { ok: true, thresholds: { ...DEFAULT_THRESHOLDS, ...parsed.data } };
	return {
		ok: false,
		issues: parsed.error.issues.map((i) => ({
			key: i.path.length ? String(i.path[0]) : 'thresholds',
			message: i.code === 'unrecognized_keys' ? `Unknown threshold: ${(i as { keys: string[] }).keys.join(', ')}` : i.message
		}))
	};
}

/** Merges overrides with the defaults; throws a RangeError naming the first bad threshold. */
export function resolveThresholds(overrides: unknown = {}): Thresholds {
	const r = safeResolveThresholds(overrides);
	if (!r.ok) throw new RangeError(`thresholds.${r.issues[0].key}: ${r.issues[0].message}`);
	return r.thresholds;
}

/** Usable upper frequency of each mounting method, Hz, from the thresholds. */
export function usableFrequencyHz(mounting: 'stud' | 'bonded_pad' | 'magnet' | 'hand_held', t: Thresholds = DEFAULT_THRESHOLDS): number {
	switch (mounting) {
		case 'stud':
			return t.usableFreqStudHz;
		case 'bonded_pad':
			return t.usableFreqStudHz * t.usableFreqPadFraction;
		case 'magnet':
			return t.usableFreqMagnetHz;
		case 'hand_held':
			return t.usableFreqHandHeldHz;
		default:
			throw new RangeError(`mounting must be one of "stud", "bonded_pad", "magnet", "hand_held", got ${JSON.stringify(mounting)}`);
	}
}
