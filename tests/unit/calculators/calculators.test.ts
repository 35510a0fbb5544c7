import { describe, expect, test } from 'vitest';
import {
	bearingDefects,
	cableSupplyCheck,
	DEFAULT_THRESHOLDS,
	defectLines,
	findingUnit,
	mountingCoverage,
	RULES,
	resolveThresholds
} from '../../../src/lib/trade';

// Case Western Reserve University Bearing Data Center, drive-end bearing 6205:
// n = 9, d = 0.3126 in, D = 1.537 in, φ = 0.
const cwru = { balls: 9, ballDiameter: 0.3126, pitchDiameter: 1.537, contactAngleDeg: 0 };

describe('bearingDefects', () => {
	test('CWRU 6205 at 1797 r/min: frequencies in Hz and in orders', () => {
		const r = bearingDefects(cwru, 1797);
		expect(r.shaftHz).toBeCloseTo(29.95, 6); // 1797 / 60
		expect(r.orders.bpfi).toBeCloseTo(5.4152, 3); // CWRU Bearing Data Center: BPFI 5.4152 × f_r
		expect(r.orders.bpfo).toBeCloseTo(3.5848, 3); // CWRU Bearing Data Center: BPFO 3.5848 × f_r
		expect(r.orders.ftf).toBeCloseTo(0.39828, 4); // CWRU Bearing Data Center: FTF 0.39828 × f_r
		expect(r.orders.bsf).toBeCloseTo(2.357, 3); // Smith & Randall 2015, MSSP 64–65, Table 2
		expect(r.hz.bpfi).toBeCloseTo(5.4152 * 29.95, 1); // 162.2 Hz, CWRU multiple × f_r
	});

	test('bad speed is a RangeError naming the field', () => {
		expect(() => bearingDefects(cwru, 0)).toThrow(/speedRpm/);
		expect(() => bearingDefects(cwru, Number.NaN)).toThrow(RangeError);
		expect(() => bearingDefects({ ...cwru, ballDiameter: 2 }, 1797)).toThrow(/ballDiameter/);
	});
});

describe('defectLines and mountingCoverage', () => {
	test('three harmonics of four frequencies, lowest first', () => {
		const { hz } = bearingDefects(cwru, 1797);
		const lines = defectLines(hz, 3);
		expect(lines).toHaveLength(12);
		expect(lines[0]).toMatchObject({ kind: 'ftf', harmonic: 1 });
		expect(lines.at(-1)).toMatchObject({ kind: 'bpfi', harmonic: 3 });
		expect(lines.at(-1)!.hz).toBeCloseTo(3 * hz.bpfi, 9);
		for (let i = 1; i < lines.length; i++) expect(lines[i].hz).toBeGreaterThanOrEqual(lines[i - 1].hz);
		expect(() => defectLines(hz, 0)).toThrow(/harmonics/);
	});

	test('a mounting sees the lines up to its usable frequency and misses the rest', () => {
		const { hz } = bearingDefects(cwru, 1797);
		const lines = defectLines(hz, 3);
		// A hand-held probe limited to 300 Hz misses BPFI 2× (≈ 324 Hz) and BPFI 3× (≈ 487 Hz) and BPFO 3× (≈ 322 Hz).
		const t = resolveThresholds({ usableFreqHandHeldHz: 300 });
		const cov = mountingCoverage(lines, t);
		expect(cov.map((c) => c.mounting)).toEqual(['stud', 'bonded_pad', 'magnet', 'hand_held']);
		expect(cov[0].usableHz).toBe(10000);
		expect(cov[1].usableHz).toBeCloseTo(8500, 6); // 0.85 × stud, the default fraction
		expect(cov[0].missed).toEqual([]);
		const hand = cov[3];
		expect(hand.missed.map((l) => `${l.kind}${l.harmonic}`).sort()).toEqual(['bpfi2', 'bpfi3', 'bpfo3']);
		expect(hand.seen.length + hand.missed.length).toBe(12);
	});
});

describe('cableSupplyCheck', () => {
	test('50 m of 1.5 mm² class 5 at 2 A drops 2.66 V', () => {
		// TRADE.md check value, derived from IEC 60228 (13.3 Ω/km class 5 at 20 °C): 2 × 50 × 2 × 0.0133.
		const r = cableSupplyCheck({ lengthM: 50, crossSectionMm2: 1.5, conductorClass: 5, currentA: 2 });
		expect(r.dropV).toBeCloseTo(2.66, 6);
		expect(r.assumedNominal).toBe(true);
		expect(r.atSensorV).toBeCloseTo(24 - 2.66, 6);
		// Within the 20.4 V minimum (IEC 61131-2), but the supply was not measured: check it.
		expect(r.finding).toMatchObject({ rule: 'route.supply-voltage', severity: 'warn' });
	});

	test('a measured supply within the window passes; a long run fails; an over-voltage supply fails', () => {
		expect(cableSupplyCheck({ lengthM: 50, crossSectionMm2: 1.5, currentA: 0.03, supplyV: 24 }).finding.severity).toBe('pass');
		const long = cableSupplyCheck({ lengthM: 100, crossSectionMm2: 1.5, conductorClass: 5, currentA: 2, supplyV: 24 });
		expect(long.atSensorV).toBeCloseTo(24 - 5.32, 6); // twice the 50 m figure
		expect(long.finding.severity).toBe('fail');
		expect(cableSupplyCheck({ lengthM: 1, crossSectionMm2: 1.5, currentA: 0.03, supplyV: 30 }).finding.severity).toBe('fail');
	});

	test('the organisation window is used', () => {
		const t = resolveThresholds({ supplyMinV: 22 });
		const r = cableSupplyCheck({ lengthM: 50, crossSectionMm2: 1.5, conductorClass: 5, currentA: 2, supplyV: 24 }, t);
		expect(r.finding.severity).toBe('fail');
		expect(r.finding.limit).toBe(22);
	});

	test('bad input is a RangeError naming the field', () => {
		expect(() => cableSupplyCheck({ lengthM: -1, crossSectionMm2: 1.5, currentA: 2 })).toThrow(/lengthM/);
		expect(() => cableSupplyCheck({ lengthM: 10, crossSectionMm2: 1.2, currentA: 2 })).toThrow(/crossSectionMm2/);
		expect(() => cableSupplyCheck({ lengthM: 10, crossSectionMm2: 1.5, currentA: 2, supplyV: -3 })).toThrow(/supplyV/);
	});
});

describe('findingUnit', () => {
	test('every rule that reads a threshold has a display unit', () => {
		for (const r of RULES) {
			if (r.kind === 'check' && r.thresholds.length && r.id !== 'mounting.pad-cure') expect(findingUnit(r.id), r.id).not.toBe('');
		}
		expect(findingUnit('distance.bearing')).toBe('mm');
		expect(findingUnit('no.such-rule')).toBe('');
		expect(DEFAULT_THRESHOLDS.distanceWarnMm).toBe(75); // TRADE.md default, common practice
	});
});
