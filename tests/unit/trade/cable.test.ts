import { describe, expect, test } from 'vitest';
import {
	cableVoltageDrop,
	conductorResistancePerMetre,
	COPPER_RESISTIVITY_20,
	IEC60228_MAX_RESISTANCE,
	maxCableLength
} from '../../../src/lib/trade';

describe('cableVoltageDrop', () => {
	test('50 m at 2 A on 1.5 mm² class 5 drops 2.66 V', () => {
		// IEC 60228 class 5, 1.5 mm²: 13.3 Ω/km at 20 °C; ΔU = 2 × 50 m × 2 A × 0.0133 Ω/m = 2.66 V (TRADE.md check value).
		expect(cableVoltageDrop({ lengthM: 50, crossSectionMm2: 1.5, currentA: 2, conductorClass: 5 })).toBeCloseTo(2.66, 10);
	});

	test('class 5 is the default conductor class', () => {
		expect(cableVoltageDrop({ lengthM: 50, crossSectionMm2: 1.5, currentA: 2 })).toBeCloseTo(2.66, 10);
	});

	test('classes 1 and 2 use the class 1/2 column', () => {
		// IEC 60228 class 1/2, 1.5 mm²: 12.1 Ω/km; 2 × 50 × 2 × 0.0121 = 2.42 V.
		expect(cableVoltageDrop({ lengthM: 50, crossSectionMm2: 1.5, currentA: 2, conductorClass: 2 })).toBeCloseTo(2.42, 10);
		expect(cableVoltageDrop({ lengthM: 50, crossSectionMm2: 1.5, currentA: 2, conductorClass: 1 })).toBeCloseTo(2.42, 10);
	});

	test('temperature correction with the IEC 60028 coefficient', () => {
		// IEC 60028: R_t = R_20 (1 + 0.00393 (t − 20)). At 70 °C: 1 + 0.00393 × 50 = 1.1965;
		// 2.66 V × 1.1965 = 3.18269 V.
		expect(cableVoltageDrop({ lengthM: 50, crossSectionMm2: 1.5, currentA: 2, conductorClass: 5, temperatureC: 70 })).toBeCloseTo(
			3.18269,
			5
		);
		// At −10 °C: 1 + 0.00393 × (−30) = 0.8821; 2.66 × 0.8821 = 2.346386 V.
		expect(cableVoltageDrop({ lengthM: 50, crossSectionMm2: 1.5, currentA: 2, conductorClass: 5, temperatureC: -10 })).toBeCloseTo(
			2.346386,
			6
		);
		// At 20 °C the table value applies unchanged.
		expect(cableVoltageDrop({ lengthM: 50, crossSectionMm2: 1.5, currentA: 2, conductorClass: 5, temperatureC: 20 })).toBeCloseTo(2.66, 10);
	});

	test('a typical sensor run: 30 m of 0.5 mm² class 5 at 30 mA', () => {
		// IEC 60228 class 5, 0.5 mm²: 39.0 Ω/km; 2 × 30 × 0.03 × 0.039 = 0.0702 V.
		expect(cableVoltageDrop({ lengthM: 30, crossSectionMm2: 0.5, currentA: 0.03 })).toBeCloseTo(0.0702, 10);
	});

	test('zero length or zero current drops nothing', () => {
		expect(cableVoltageDrop({ lengthM: 0, crossSectionMm2: 1, currentA: 1 })).toBe(0);
		expect(cableVoltageDrop({ lengthM: 10, crossSectionMm2: 1, currentA: 0 })).toBe(0);
	});

	test('the table maxima sit above annealed copper and class 5 above class 1/2', () => {
		// IEC 60028: annealed copper 0.017241 Ω·mm²/m, so a conductor of A mm² has at least 17.241/A Ω/km
		// (before stranding and tolerance allowances, which only add).
		for (const row of IEC60228_MAX_RESISTANCE) {
			const floor = (COPPER_RESISTIVITY_20 / row.crossSectionMm2) * 1000;
			expect(row.class12OhmPerKm).toBeGreaterThan(floor);
			expect(row.class12OhmPerKm).toBeLessThan(floor * 1.1);
			expect(row.class5OhmPerKm).toBeGreaterThan(row.class12OhmPerKm);
		}
	});

	test('an unlisted cross-section is refused with the list of sizes', () => {
		expect(() => cableVoltageDrop({ lengthM: 10, crossSectionMm2: 1.2, currentA: 1 })).toThrow(RangeError);
		expect(() => cableVoltageDrop({ lengthM: 10, crossSectionMm2: 1.2, currentA: 1 })).toThrow(
			/crossSectionMm2.*0\.5, 0\.75, 1, 1\.5, 2\.5/
		);
	});

	test('conductorResistancePerMetre reads the table', () => {
		expect(conductorResistancePerMetre(2.5, 5)).toBeCloseTo(0.00798, 12); // IEC 60228 class 5, 2.5 mm²: 7.98 Ω/km
		expect(conductorResistancePerMetre(0.75, 2)).toBeCloseTo(0.0245, 12); // IEC 60228 class 2, 0.75 mm²: 24.5 Ω/km
	});
});

describe('maxCableLength', () => {
	test('is the inverse of the drop', () => {
		// 24 V supply, 20.4 V minimum (IEC 61131-2 defaults), 1.5 mm² class 5, 2 A:
		// (24 − 20.4) / (2 × 2 × 0.0133) = 3.6 / 0.0532 = 67.669 m.
		const L = maxCableLength({ crossSectionMm2: 1.5, currentA: 2, supplyV: 24, minV: 20.4 });
		expect(L).toBeCloseTo(67.669, 3);
		expect(cableVoltageDrop({ lengthM: L, crossSectionMm2: 1.5, currentA: 2 })).toBeCloseTo(3.6, 9);
	});

	test('no current means no limit; a supply already below the minimum allows nothing', () => {
		expect(maxCableLength({ crossSectionMm2: 1, currentA: 0, supplyV: 24, minV: 20.4 })).toBe(Infinity);
		expect(maxCableLength({ crossSectionMm2: 1, currentA: 0.03, supplyV: 20, minV: 20.4 })).toBe(0);
	});
});
