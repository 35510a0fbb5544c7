import { describe, expect, test } from 'vitest';
import { alarmLevel, severityZone, type Foundation, type MachineGroup } from '../../../src/lib/trade';

// ISO 10816-3:1998/2009 Tables A.1 and A.2 (via a secondary transcription; TRADE.md), velocity r.m.s. mm/s.
const rows: Array<{ group: MachineGroup; foundation: Foundation; ab: number; bc: number; cd: number }> = [
	{ group: 1, foundation: 'rigid', ab: 2.3, bc: 4.5, cd: 7.1 },
	{ group: 1, foundation: 'flexible', ab: 3.5, bc: 7.1, cd: 11.0 },
	{ group: 2, foundation: 'rigid', ab: 1.4, bc: 2.8, cd: 4.5 },
	{ group: 2, foundation: 'flexible', ab: 2.3, bc: 4.5, cd: 7.1 }
];

describe('severityZone', () => {
	// A value exactly on a boundary goes to the upper (worse) zone: the tables give the
	// boundary values only, and taking the worse side never understates a reading.
	for (const r of rows) {
		describe(`group ${r.group}, ${r.foundation}`, () => {
			const z = (velocityMmS: number) => severityZone({ group: r.group, foundation: r.foundation, velocityMmS });
			test(`A/B boundary ${r.ab} mm/s`, () => {
				expect(z(r.ab)).toBe('B'); // on the boundary: upper zone
				expect(z(r.ab - 0.01)).toBe('A');
			});
			test(`B/C boundary ${r.bc} mm/s`, () => {
				expect(z(r.bc)).toBe('C'); // on the boundary: upper zone
				expect(z(r.bc - 0.01)).toBe('B');
			});
			test(`C/D boundary ${r.cd} mm/s`, () => {
				expect(z(r.cd)).toBe('D'); // on the boundary: upper zone
				expect(z(r.cd - 0.01)).toBe('C');
			});
			test('ends of the scale', () => {
				expect(z(0)).toBe('A');
				expect(z(50)).toBe('D');
			});
		});
	}
});

describe('alarmLevel', () => {
	test('baseline plus a quarter of B/C, capped at 1.25 × B/C', () => {
		// Rule of thumb from memory (TRADE.md). Group 2 rigid, B/C = 2.8 mm/s:
		// 1.0 + 0.25 × 2.8 = 1.7 mm/s; cap 1.25 × 2.8 = 3.5 mm/s.
		expect(alarmLevel({ group: 2, foundation: 'rigid', baselineMmS: 1.0 })).toBeCloseTo(1.7, 12);
		expect(alarmLevel({ group: 2, foundation: 'rigid', baselineMmS: 3.2 })).toBeCloseTo(3.5, 12);
	});
});
