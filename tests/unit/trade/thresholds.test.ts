import { describe, expect, test } from 'vitest';
import {
	DEFAULT_THRESHOLDS,
	resolveThresholds,
	safeResolveThresholds,
	THRESHOLD_META,
	thresholdsSchema,
	usableFrequencyHz
} from '../../../src/lib/trade';

describe('defaults', () => {
	test('match TRADE.md', () => {
		expect(DEFAULT_THRESHOLDS).toMatchObject({
			minFlatDiameterMm: 30, // common practice
			minWallThicknessStudMm: 15, // common practice (M6 hole depth)
			minThreadDepthMm: 9, // common practice
			distanceWarnMm: 75, // common practice
			distanceFailMm: 150, // common practice
			minSpeedRpm: 600, // Kim, Tan & Kosse 2008
			maxSurfaceTempC: 80, // from memory
			supplyMinV: 20.4, // IEC 61131-2 (−15 %, from memory)
			supplyMaxV: 28.8, // IEC 61131-2 (+20 %, from memory)
			nominalSupplyV: 24, // IEC 61131-2
			studTorqueLimitNm: 10, // common practice
			padCureMin: 15, // common practice
			threadEngagementSteel: 1.0, // machine-design tables
			threadEngagementAluminium: 2.0 // machine-design tables
		});
		expect(DEFAULT_THRESHOLDS.sensorCurrentA).toBeGreaterThan(0);
	});

	test('supply limits are −15 % and +20 % of 24 V', () => {
		expect(DEFAULT_THRESHOLDS.supplyMinV).toBeCloseTo(24 * 0.85, 12);
		expect(DEFAULT_THRESHOLDS.supplyMaxV).toBeCloseTo(24 * 1.2, 12);
	});

	test('usable frequency falls from stud to pad to magnet to hand-held', () => {
		const stud = usableFrequencyHz('stud');
		const pad = usableFrequencyHz('bonded_pad');
		const magnet = usableFrequencyHz('magnet');
		const hand = usableFrequencyHz('hand_held');
		expect(stud).toBeGreaterThan(pad);
		expect(pad).toBeGreaterThan(magnet);
		expect(magnet).toBeGreaterThan(hand);
		// Harris' handbook figures (from memory): pad 80–95 % of stud, magnet 5–10 kHz, hand-held 0.5–2 kHz.
		expect(pad / stud).toBeGreaterThanOrEqual(0.8);
		expect(pad / stud).toBeLessThanOrEqual(0.95);
		expect(magnet).toBeGreaterThanOrEqual(5000);
		expect(magnet).toBeLessThanOrEqual(10000);
		expect(hand).toBeGreaterThanOrEqual(500);
		expect(hand).toBeLessThanOrEqual(2000);
	});
});

describe('THRESHOLD_META', () => {
	test('describes every threshold once, with a source, a firmness and a default in range', () => {
		const keys = THRESHOLD_META.map((m) => m.key);
		expect(new Set(keys).size).toBe(keys.length);
		expect(new Set(keys)).toEqual(new Set(Object.keys(DEFAULT_THRESHOLDS)));
		for (const m of THRESHOLD_META) {
			expect(['published', 'common practice', 'from memory']).toContain(m.firmness);
			expect(m.source.length).toBeGreaterThan(10);
			expect(m.label.length).toBeGreaterThan(0);
			expect(m.unit.length).toBeGreaterThan(0);
			expect(m.min).toBeLessThanOrEqual(m.default);
			expect(m.default).toBeLessThanOrEqual(m.max);
			expect(DEFAULT_THRESHOLDS[m.key]).toBe(m.default);
		}
	});
	test('values recalled from memory are marked so', () => {
		const firm = Object.fromEntries(THRESHOLD_META.map((m) => [m.key, m.firmness]));
		expect(firm.maxSurfaceTempC).toBe('from memory');
		expect(firm.sensorCurrentA).toBe('from memory');
		expect(firm.usableFreqStudHz).toBe('from memory');
		expect(firm.usableFreqMagnetHz).toBe('from memory');
		expect(firm.minSpeedRpm).toBe('published');
		expect(firm.minFlatDiameterMm).toBe('common practice');
	});
});

describe('thresholdsSchema', () => {
	test('accepts no overrides and valid overrides', () => {
		expect(thresholdsSchema.safeParse({}).success).toBe(true);
		expect(thresholdsSchema.safeParse({ minFlatDiameterMm: 25, distanceWarnMm: 50 }).success).toBe(true);
	});
	test('rejects negative lengths, non-numbers and out-of-range values with the label', () => {
		const neg = thresholdsSchema.safeParse({ distanceWarnMm: -1 });
		expect(neg.success).toBe(false);
		expect(neg.error!.issues[0].path).toEqual(['distanceWarnMm']);
		expect(neg.error!.issues[0].message).toMatch(/Distance to bearing.*at least 0 mm/);
		expect(thresholdsSchema.safeParse({ minWallThicknessStudMm: -15 }).success).toBe(false);
		expect(thresholdsSchema.safeParse({ minFlatDiameterMm: '30' }).success).toBe(false);
		expect(thresholdsSchema.safeParse({ minFlatDiameterMm: Number.NaN }).success).toBe(false);
		expect(thresholdsSchema.safeParse({ maxSurfaceTempC: Infinity }).success).toBe(false);
		expect(thresholdsSchema.safeParse({ minSpeedRpm: 1e6 }).success).toBe(false);
	});
	test('rejects unknown keys so a typo cannot leave a default in force', () => {
		expect(thresholdsSchema.safeParse({ minFlatDiameter: 25 }).success).toBe(false);
	});
	test('enforces stud > bonded pad > magnet > hand-held', () => {
		// pad = 10 000 × 0.85 = 8500 Hz by default; a 9000 Hz magnet would beat it.
		const r = thresholdsSchema.safeParse({ usableFreqMagnetHz: 9000 });
		expect(r.success).toBe(false);
		expect(r.error!.issues[0].path).toEqual(['usableFreqMagnetHz']);
		expect(thresholdsSchema.safeParse({ usableFreqStudHz: 5000 }).success).toBe(false); // pad 4250 < magnet 5000
		expect(thresholdsSchema.safeParse({ usableFreqStudHz: 5000, usableFreqMagnetHz: 3000 }).success).toBe(true);
		expect(thresholdsSchema.safeParse({ usableFreqHandHeldHz: 6000 }).success).toBe(false);
		expect(thresholdsSchema.safeParse({ usableFreqPadFraction: 1 }).success).toBe(false); // a pad never beats a stud
	});
	test('keeps the distance, supply and hole depth limits in order', () => {
		expect(thresholdsSchema.safeParse({ distanceWarnMm: 200 }).success).toBe(false);
		expect(thresholdsSchema.safeParse({ distanceWarnMm: 200, distanceFailMm: 300 }).success).toBe(true);
		expect(thresholdsSchema.safeParse({ supplyMinV: 25 }).success).toBe(false);
		expect(thresholdsSchema.safeParse({ supplyMaxV: 23 }).success).toBe(false);
		expect(thresholdsSchema.safeParse({ minThreadDepthMm: 20 }).success).toBe(false);
	});
});

describe('resolveThresholds', () => {
	test('merges overrides with defaults', () => {
		expect(resolveThresholds({ padCureMin: 30 })).toEqual({ ...DEFAULT_THRESHOLDS, padCureMin: 30 });
		expect(resolveThresholds()).toEqual(DEFAULT_THRESHOLDS);
	});
	test('throws a RangeError naming the threshold', () => {
		expect(() => resolveThresholds({ distanceFailMm: -3 })).toThrow(RangeError);
		expect(() => resolveThresholds({ distanceFailMm: -3 })).toThrow(/thresholds\.distanceFailMm/);
	});
	test('safeResolveThresholds lists every problem', () => {
		const r = safeResolveThresholds({ minFlatDiameterMm: -1, bogus: 2 });
		expect(r.ok).toBe(false);
		if (!r.ok) {
			expect(r.issues.map((i) => i.key)).toContain('minFlatDiameterMm');
			expect(r.issues.some((i) => /Unknown threshold: bogus/.test(i.message))).toBe(true);
		}
	});
});
