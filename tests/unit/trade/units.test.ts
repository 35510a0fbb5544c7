import { describe, expect, test } from 'vitest';
import {
	accelerationFromVelocity,
	displacementFromVelocity,
	G_N,
	gToMS2,
	hzToRpm,
	mmSToMs,
	ms2ToG,
	msToMmS,
	peakFromRms,
	peakToPeakFromPeak,
	rmsFromPeak,
	rpmToHz,
	velocityFromAcceleration
} from '../../../src/lib/trade';

describe('unit conversions', () => {
	test('g_n is 9.80665 m/s²', () => {
		expect(G_N).toBe(9.80665); // ISO 80000-3
		expect(gToMS2(1)).toBe(9.80665);
		expect(ms2ToG(9.80665)).toBe(1);
	});

	test('1 g peak at 100 Hz is 15.608 mm/s peak', () => {
		// TRADE.md check value (derived): v = 9.80665 / (2π × 100) = 0.0156078 m/s.
		const v = velocityFromAcceleration(gToMS2(1), 100);
		expect(msToMmS(v)).toBeCloseTo(15.608, 3);
	});

	test('velocity to displacement at 100 Hz', () => {
		// x = v/(2πf): 0.0156078 m/s / 628.3185 rad/s = 2.48406e-5 m = 24.84 µm peak (derived).
		const x = displacementFromVelocity(velocityFromAcceleration(G_N, 100), 100);
		expect(x * 1e6).toBeCloseTo(24.8406, 3);
	});

	test('acceleration and velocity round-trip', () => {
		expect(accelerationFromVelocity(velocityFromAcceleration(3.2, 47), 47)).toBeCloseTo(3.2, 12);
	});

	test('r.m.s. and peak of a sine', () => {
		// r.m.s. = peak / √2 for a sine: 10 / 1.41421356 = 7.0710678.
		expect(rmsFromPeak(10)).toBeCloseTo(7.0710678, 7);
		expect(peakFromRms(7.0710678)).toBeCloseTo(10, 6);
		expect(peakToPeakFromPeak(2.5)).toBe(5);
	});

	test('mm/s and m/s; r/min and Hz', () => {
		expect(mmSToMs(4.5)).toBeCloseTo(0.0045, 15);
		expect(msToMmS(0.0045)).toBeCloseTo(4.5, 12);
		expect(rpmToHz(1500)).toBe(25);
		expect(hzToRpm(25)).toBe(1500);
	});
});
