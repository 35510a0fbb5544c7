import { requireNumber, requireOneOf } from './validate';

export type MachineGroup = 1 | 2;
export type Foundation = 'rigid' | 'flexible';
export type Zone = 'A' | 'B' | 'C' | 'D';

export interface ZoneBoundaries {
	/** A/B, B/C and C/D boundaries, velocity r.m.s. in mm/s. */
	ab: number;
	bc: number;
	cd: number;
}

/**
 * ISO 10816-3:1998/2009 Tables A.1 and A.2, velocity r.m.s. over 10–1000 Hz
 * (2–1000 Hz below 600 r/min). Group 1: 300 kW – 50 MW; group 2: 15 – 300 kW.
 */
export const ISO10816_3_BOUNDARIES: Readonly<Record<MachineGroup, Record<Foundation, ZoneBoundaries>>> = {
	1: { rigid: { ab: 2.3, bc: 4.5, cd: 7.1 }, flexible: { ab: 3.5, bc: 7.1, cd: 11.0 } },
	2: { rigid: { ab: 1.4, bc: 2.8, cd: 4.5 }, flexible: { ab: 2.3, bc: 4.5, cd: 7.1 } }
};

/**
 * The edition the zone boundaries come from, and what it rests on, in words for the pages.
 * ISO 10816-3 was first published in 1998 and amended in 2009; ISO 20816-3 (2022, year from
 * memory) has since replaced it.
 */
export const SEVERITY_STANDARD = {
	edition: 'ISO 10816-3:1998 with Amendment 1:2009',
	tables: 'Tables A.1 and A.2',
	restsOn:
		'The boundary values were read from a published transcription of the tables, not from the standard itself; a site confirms them against its own copy of the standard.',
	replacedBy:
		'ISO 20816-3 has replaced ISO 10816-3. A site that works to ISO 20816-3 should check its zone boundaries against that edition before relying on these.'
} as const;

/** What each zone means, in ISO 10816-3's sense, worded for the site. */
export const ZONE_MEANING: Readonly<Record<Zone, string>> = {
	A: 'Typical of newly commissioned machines.',
	B: 'Acceptable for unrestricted long-term running.',
	C: 'Not acceptable for long-term running; plan a repair at the next opportunity.',
	D: 'Severe enough to cause damage.'
};

export function zoneBoundaries(group: MachineGroup, foundation: Foundation): ZoneBoundaries {
	requireOneOf('group', group, [1, 2] as const);
	requireOneOf('foundation', foundation, ['rigid', 'flexible'] as const);
	return ISO10816_3_BOUNDARIES[group][foundation];
}

/**
 * Evaluation zone for a velocity reading. A value exactly on a boundary goes to the upper
 * zone: 2.8 mm/s on a rigid group 2 machine is zone C, not B. The standard's tables list the
 * boundary values without saying which side they fall; taking the worse side never
 * understates a reading.
 */
export function severityZone(z: { group: MachineGroup; foundation: Foundation; velocityMmS: number }): Zone {
	if (typeof z !== 'object' || z === null) throw new RangeError('severity input must be an object');
	const b = zoneBoundaries(z.group, z.foundation);
	const v = requireNumber('velocityMmS', z.velocityMmS, { min: 0, max: 1000, unit: 'mm/s' });
	if (v >= b.cd) return 'D';
	if (v >= b.bc) return 'C';
	if (v >= b.ab) return 'B';
	return 'A';
}

/**
 * A common alarm setting: baseline plus 0.25 × the B/C boundary, capped at 1.25 × that
 * boundary (from memory; a rule of thumb, not part of the standard's tables).
 */
export function alarmLevel(a: { group: MachineGroup; foundation: Foundation; baselineMmS: number }): number {
	const b = zoneBoundaries(a.group, a.foundation);
	const base = requireNumber('baselineMmS', a.baselineMmS, { min: 0, max: 1000, unit: 'mm/s' });
	return Math.min(base + 0.25 * b.bc, 1.25 * b.bc);
}
