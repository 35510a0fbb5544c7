import { describe, expect, test } from 'vitest';
import { THRESHOLD_GROUPS } from '../../../src/routes/(app)/settings/thresholds/groups';
import { parseThresholdForm, validateThresholdOverrides, withoutDefaults } from '../../../src/lib/schemas/thresholds';
import { DEFAULT_THRESHOLDS, THRESHOLD_KEYS } from '../../../src/lib/trade';

function form(fields: Record<string, string>) {
	const f = new FormData();
	for (const [k, v] of Object.entries(fields)) f.set(k, v);
	return f;
}

describe('settings groups', () => {
	test('every threshold appears in exactly one group', () => {
		const listed = THRESHOLD_GROUPS.flatMap((g) => g.keys);
		expect([...listed].sort()).toEqual([...THRESHOLD_KEYS].sort());
		expect(new Set(listed).size).toBe(listed.length);
	});
});

describe('validateThresholdOverrides', () => {
	test('keeps only the values that differ from the defaults', () => {
		const r = validateThresholdOverrides({ distanceWarnMm: 75, distanceFailMm: 120 });
		expect(r).toEqual({ ok: true, overrides: { distanceFailMm: 120 } });
		expect(withoutDefaults({ ...DEFAULT_THRESHOLDS })).toEqual({});
	});

	test('negative lengths, out-of-range and equal check/fail levels are refused per field', () => {
		const neg = validateThresholdOverrides({ minWallThicknessStudMm: -1 });
		expect(neg.ok).toBe(false);
		if (!neg.ok) expect(neg.errors.minWallThicknessStudMm?.[0]).toMatch(/cannot be negative/);
		const eq = validateThresholdOverrides({ distanceWarnMm: 100, distanceFailMm: 100 });
		expect(eq.ok).toBe(false);
		if (!eq.ok) expect(eq.errors.distanceWarnMm?.[0]).toMatch(/must be below the fail level/);
		const ok = validateThresholdOverrides({ distanceWarnMm: 99, distanceFailMm: 100 });
		expect(ok.ok).toBe(true);
	});
});

describe('parseThresholdForm', () => {
	test('reads numbers, comma decimals and empty fields, and returns what was typed', () => {
		const { values, result } = parseThresholdForm(form({ studTorqueLimitNm: ' 7,5 ', minSpeedRpm: '', maxSurfaceTempC: '1e2' }));
		expect(values.studTorqueLimitNm).toBe('7,5');
		expect(result).toEqual({ ok: true, overrides: { studTorqueLimitNm: 7.5, maxSurfaceTempC: 100 } });
	});

	test('text that is not a number is an error beside its field, together with the other fields’ errors', () => {
		const { values, result } = parseThresholdForm(form({ maxSurfaceTempC: '12 mm', distanceFailMm: '-5', padCureMin: '0x10' }));
		expect(values.maxSurfaceTempC).toBe('12 mm');
		expect(result.ok).toBe(false);
		if (!result.ok) {
			expect(result.errors.maxSurfaceTempC?.[0]).toMatch(/must be a number/);
			expect(result.errors.padCureMin?.[0]).toMatch(/must be a number/);
			expect(result.errors.distanceFailMm?.[0]).toMatch(/cannot be negative/);
		}
	});
});

describe('where an ordering error lands', () => {
	test('on the field that was changed, not on its unchanged partner', () => {
		// The form sends every field; the check distance is still at its default 75 mm.
		const all = Object.fromEntries(THRESHOLD_KEYS.map((k) => [k, String(DEFAULT_THRESHOLDS[k])]));
		const { result } = parseThresholdForm(form({ ...all, distanceFailMm: '60' }));
		expect(result.ok).toBe(false);
		if (!result.ok) {
			expect(result.errors.distanceFailMm?.[0]).toMatch(/check level \(75 mm\)/);
			expect(result.errors.distanceWarnMm).toBeUndefined();
		}
	});

	test('a negative value gets its own message and no ordering message on the partner', () => {
		const all = Object.fromEntries(THRESHOLD_KEYS.map((k) => [k, String(DEFAULT_THRESHOLDS[k])]));
		const { result } = parseThresholdForm(form({ ...all, distanceFailMm: '-5' }));
		expect(result.ok).toBe(false);
		if (!result.ok) {
			expect(result.errors.distanceFailMm?.[0]).toMatch(/cannot be negative/);
			expect(Object.keys(result.errors)).toEqual(['distanceFailMm']);
		}
	});
});

describe('thresholds typed in US customary units', () => {
	test('are stored in SI; values shown for the defaults come back as the defaults', () => {
		// 1 in = 25.4 mm and 1 lbf·ft = 1.3558179483 N·m (NIST SP 811, B.8); °F = °C × 9/5 + 32.
		const { result } = parseThresholdForm(
			form({ minFlatDiameterMm: '1.1811', distanceWarnMm: '2', maxSurfaceTempC: '212', studTorqueLimitNm: '7.3756' }),
			'us'
		);
		expect(result).toEqual({ ok: true, overrides: { distanceWarnMm: 50.8, maxSurfaceTempC: 100 } });
	});

	test('a value out of range is reported in the unit it was typed in', () => {
		const { result } = parseThresholdForm(form({ minFlatDiameterMm: '10', maxSurfaceTempC: 'warm' }), 'us');
		expect(result.ok).toBe(false);
		if (!result.ok) {
			// The largest flat seat allowed is 200 mm = 7.874 in.
			expect(result.errors.minFlatDiameterMm?.[0]).toBe('Smallest flat seat diameter must be at most 7.874 in.');
			expect(result.errors.maxSurfaceTempC?.[0]).toMatch(/must be a number in °F/);
		}
	});
});
