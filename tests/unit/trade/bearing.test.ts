import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { bearingFrequencies } from '../../../src/lib/trade';

function relErr(actual: number, expected: number) {
	return Math.abs(actual - expected) / Math.abs(expected);
}

describe('bearingFrequencies', () => {
	// Case Western Reserve University Bearing Data Center, drive-end bearing (6205):
	// n = 9, d = 0.3126 in, D = 1.537 in, φ = 0. Multiples of shaft speed, so f_r = 1 Hz.
	const cwru = { balls: 9, ballDiameter: 0.3126, pitchDiameter: 1.537 };

	test('matches the CWRU drive-end bearing multiples', () => {
		const f = bearingFrequencies(cwru, 1);
		expect(relErr(f.bpfi, 5.4152)).toBeLessThan(1e-3); // CWRU Bearing Data Center: BPFI 5.4152 × f_r
		expect(relErr(f.bpfo, 3.5848)).toBeLessThan(1e-3); // CWRU Bearing Data Center: BPFO 3.5848 × f_r
		expect(relErr(f.ftf, 0.39828)).toBeLessThan(1e-3); // CWRU Bearing Data Center: FTF 0.39828 × f_r
		// Smith & Randall 2015, MSSP 64–65:100–131, Table 2: BSF 2.357 × f_r. The data centre's
		// page lists 4.7135, which is 2 × BSF (a ball defect strikes both races per spin).
		expect(relErr(f.bsf, 2.357)).toBeLessThan(1e-3);
		expect(relErr(2 * f.bsf, 4.7135)).toBeLessThan(1e-3); // CWRU Bearing Data Center (2 × BSF)
	});

	test('scales with shaft speed', () => {
		// 1797 r/min is one of the CWRU test speeds; the multiples above still apply.
		const shaftHz = 1797 / 60;
		const f = bearingFrequencies(cwru, shaftHz);
		expect(relErr(f.bpfi, 5.4152 * shaftHz)).toBeLessThan(1e-3); // CWRU multiple × f_r
		expect(relErr(f.bpfo, 3.5848 * shaftHz)).toBeLessThan(1e-3); // CWRU multiple × f_r
	});

	test('angular contact bearing, worked by hand from Randall & Antoni 2011', () => {
		// Randall & Antoni 2011, MSSP 25:485–520, eqs. for FTF, BPFO, BPFI, BSF.
		// Geometry chosen for round numbers: n = 12, d = 8 mm, D = 40 mm, φ = 40°, f_r = 25 Hz.
		// cos 40° = 0.766044443 (four-figure tables: 0.7660).
		// (d/D)·cos φ = 0.2 × 0.766044443 = 0.153208889
		const ratio = 0.2 * 0.766044443;
		const g = { balls: 12, ballDiameter: 8, pitchDiameter: 40, contactAngleDeg: 40 };
		const f = bearingFrequencies(g, 25);

		// FTF = (25/2)(1 − 0.153208889) = 12.5 × 0.846791111 = 10.58489 Hz
		expect((25 / 2) * (1 - ratio)).toBeCloseTo(10.58489, 4);
		expect(f.ftf).toBeCloseTo(10.58489, 4);
		// BPFO = (12 × 25/2)(1 − 0.153208889) = 150 × 0.846791111 = 127.01867 Hz
		expect(((12 * 25) / 2) * (1 - ratio)).toBeCloseTo(127.01867, 4);
		expect(f.bpfo).toBeCloseTo(127.01867, 4);
		// BPFI = 150 × (1 + 0.153208889) = 150 × 1.153208889 = 172.98133 Hz
		expect(((12 * 25) / 2) * (1 + ratio)).toBeCloseTo(172.98133, 4);
		expect(f.bpfi).toBeCloseTo(172.98133, 4);
		// BSF = (40 × 25 / (2 × 8))(1 − 0.153208889²) = 62.5 × (1 − 0.023472964) = 62.5 × 0.976527036 = 61.03294 Hz
		expect(((40 * 25) / (2 * 8)) * (1 - ratio * ratio)).toBeCloseTo(61.03294, 4);
		expect(f.bsf).toBeCloseTo(61.03294, 4);
	});

	test('a 90° contact angle (thrust bearing) removes the geometry term', () => {
		// Randall & Antoni 2011: with cos 90° = 0, FTF = f_r/2, BPFO = BPFI = n·f_r/2, BSF = D·f_r/(2d).
		const f = bearingFrequencies({ balls: 10, ballDiameter: 10, pitchDiameter: 60, contactAngleDeg: 90 }, 20);
		expect(f.ftf).toBeCloseTo(10, 9);
		expect(f.bpfo).toBeCloseTo(100, 9);
		expect(f.bpfi).toBeCloseTo(100, 9);
		expect(f.bsf).toBeCloseTo(60, 9);
	});

	test('omitting the contact angle is the same as 0°', () => {
		expect(bearingFrequencies(cwru, 30)).toEqual(bearingFrequencies({ ...cwru, contactAngleDeg: 0 }, 30));
	});

	test('identities: BPFO + BPFI = n·f_r and BPFO = n·FTF, for any valid geometry', () => {
		fc.assert(
			fc.property(
				fc.integer({ min: 3, max: 40 }),
				fc.double({ min: 1, max: 100, noNaN: true }),
				fc.double({ min: 0.05, max: 0.3, noNaN: true }),
				fc.double({ min: 0, max: 45, noNaN: true }),
				fc.double({ min: 0.1, max: 500, noNaN: true }),
				(n, D, ratio, phi, fr) => {
					const d = ratio * D;
					fc.pre(n * d < Math.PI * D);
					const f = bearingFrequencies({ balls: n, ballDiameter: d, pitchDiameter: D, contactAngleDeg: phi }, fr);
					expect(relErr(f.bpfo + f.bpfi, n * fr)).toBeLessThan(1e-12);
					expect(relErr(f.bpfo, n * f.ftf)).toBeLessThan(1e-12);
					expect(f.bpfi).toBeGreaterThan(f.bpfo);
					expect(f.ftf).toBeLessThan(fr / 2 + 1e-12);
				}
			)
		);
	});

	test('zero shaft speed gives zero frequencies', () => {
		expect(bearingFrequencies(cwru, 0)).toEqual({ ftf: 0, bsf: 0, bpfo: 0, bpfi: 0 });
	});
});
