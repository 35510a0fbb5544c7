import { describe, expect, test } from 'vitest';
import type { JobPackMaterialLine, JobPackPreparation } from '../../../src/lib/server/jobs/pack/types';
import {
	billOfMaterials,
	CABLE_MARGIN,
	cableFixings,
	cableToCutM,
	DEFAULT_THRESHOLDS,
	jobTools,
	lockoutRequired,
	planJob,
	pointChecklist,
	preparationSummary,
	seatPreparation,
	STUD_THREAD,
	studHoleRequirement,
	torqueLimitNm,
	type JobPlanPoint
} from '../../../src/lib/trade';

describe('studHoleRequirement: M6 thread and engagement by housing material', () => {
	test('M6 coarse: pitch 1.0 mm (ISO 261), minor diameter 4.917 mm (ISO 724), tap drill 5.0 mm (tables after ISO 2306: d − P)', () => {
		expect(STUD_THREAD.pitchMm).toBe(1.0);
		expect(STUD_THREAD.minorDiameterMm).toBeCloseTo(4.917, 3);
		expect(STUD_THREAD.tapDrillMm).toBe(5.0);
		expect(STUD_THREAD.nominalDiameterMm - STUD_THREAD.pitchMm).toBe(STUD_THREAD.tapDrillMm);
		expect(studHoleRequirement('steel')).toMatchObject({ thread: 'M6', tapDrillMm: 5.0 });
	});
	test('aluminium housing: 2·d = 12 mm engagement, so 12 mm of thread and an 18 mm hole (common practice: machine-design tables, e.g. Roloff/Matek, from memory)', () => {
		const alu = studHoleRequirement('aluminium');
		expect(alu.engagementFactor).toBe(2);
		expect(alu.engagementMm).toBe(12);
		expect(alu.threadMm).toBe(12);
		// Hole = thread + (15 mm hole − 9 mm thread) run-out of the defaults (common practice).
		expect(alu.holeMm).toBe(18);
		expect(alu.wallMm).toBe(18);
	});
	test('steel (1.0·d = 6 mm) and cast iron (1.5·d = 9 mm) stay at the 9 mm minimum thread, 15 mm hole (common practice)', () => {
		expect(studHoleRequirement('steel')).toMatchObject({ engagementMm: 6, threadMm: 9, holeMm: 15 });
		expect(studHoleRequirement('cast_iron')).toMatchObject({ engagementMm: 9, threadMm: 9, holeMm: 15 });
	});
	test('aluminium needs more engagement than cast iron, which needs more than steel', () => {
		const e = (m: 'steel' | 'cast_iron' | 'aluminium') => studHoleRequirement(m).engagementMm!;
		expect(e('aluminium')).toBeGreaterThan(e('cast_iron'));
		expect(e('cast_iron')).toBeGreaterThan(e('steel'));
	});
	test('unknown material: minimum thread, engagement unknown', () => {
		expect(studHoleRequirement(undefined)).toMatchObject({ engagementMm: null, threadMm: 9, holeMm: 15 });
		expect(studHoleRequirement(null)).toMatchObject({ engagementMm: null, threadMm: 9 });
	});
	test('the organisation thresholds are used: 2.5·d in aluminium gives 15 mm of thread and a 21 mm hole', () => {
		const t = { ...DEFAULT_THRESHOLDS, threadEngagementAluminium: 2.5 };
		expect(studHoleRequirement('aluminium', t)).toMatchObject({ engagementMm: 15, threadMm: 15, holeMm: 21 });
	});
});

describe('seatPreparation by mounting method', () => {
	test('tapped stud in an aluminium housing', () => {
		const p: JobPackPreparation = seatPreparation('stud', { material: 'aluminium' });
		expect(p).toEqual({
			mounting: 'stud',
			spotFaceDiameterMm: 30,
			thread: 'M6',
			tapDrillMm: 5,
			holeDepthMm: 18,
			threadDepthMm: 12,
			threadEngagementMm: 12,
			pad: null,
			adhesive: null,
			cureWaitMin: null
		});
		const summary = preparationSummary(p, { material: 'aluminium' });
		expect(summary).toContain('Spot-face Ø30 mm');
		expect(summary).toContain('drill Ø5.0 × 18 mm');
		expect(summary).toContain('tap M6 × 12 mm full thread');
		expect(summary).toContain('12 mm engagement in aluminium');
	});
	test('stud without a recorded material says to confirm it before drilling', () => {
		const p = seatPreparation('stud');
		expect(p.threadEngagementMm).toBeNull();
		expect(preparationSummary(p)).toMatch(/housing material not recorded/);
	});
	test('bonded pad: ground seat, pad, adhesive and the cure wait from the thresholds (15 min default, common practice)', () => {
		const p = seatPreparation('bonded_pad');
		expect(p).toMatchObject({ mounting: 'bonded_pad', spotFaceDiameterMm: 30, cureWaitMin: 15, thread: null, holeDepthMm: null });
		expect(p.pad).toBeTruthy();
		expect(p.adhesive).toBeTruthy();
		expect(seatPreparation('bonded_pad', { thresholds: { ...DEFAULT_THRESHOLDS, padCureMin: 40 } }).cureWaitMin).toBe(40);
		expect(preparationSummary(p)).toMatch(/cure at least 15 min/);
	});
	test('magnet: nothing machined', () => {
		const p = seatPreparation('magnet');
		expect(p).toMatchObject({ mounting: 'magnet', spotFaceDiameterMm: null, thread: null, pad: null, cureWaitMin: null });
		expect(preparationSummary(p)).toMatch(/no machining/);
	});
	test('no or bad mounting gives an empty preparation, never a crash', () => {
		expect(seatPreparation(null).mounting).toBeNull();
		expect(seatPreparation('glue' as never).mounting).toBeNull();
		expect(preparationSummary(seatPreparation(undefined))).toMatch(/not chosen/);
	});
	test('torque limit: 10 N·m default for stud and pad (common practice), none for a magnet', () => {
		expect(torqueLimitNm('stud')).toBe(10);
		expect(torqueLimitNm('bonded_pad')).toBe(10);
		expect(torqueLimitNm('magnet')).toBeNull();
		expect(torqueLimitNm('stud', { ...DEFAULT_THRESHOLDS, studTorqueLimitNm: 6 })).toBe(6);
	});
});

describe('lockoutRequired', () => {
	test('a stud mount always needs stop and lockout (drilling and tapping)', () => {
		const d = lockoutRequired([{ label: 'P1', mounting: 'stud' }]);
		expect(d.required).toBe(true);
		expect(d.reasons).toEqual(['P1: drilling and tapping the stud hole.']);
	});
	test('grinding a pad seat needs it too; magnets alone do not unless asked', () => {
		expect(lockoutRequired([{ label: 'P2', mounting: 'bonded_pad' }]).required).toBe(true);
		expect(lockoutRequired([{ label: 'P3', mounting: 'magnet' }])).toEqual({ required: false, reasons: [] });
		expect(lockoutRequired([{ label: 'P3', mounting: 'magnet' }], { requested: true }).required).toBe(true);
	});
	test('an undecided mounting counts as drilling', () => {
		expect(lockoutRequired([{ label: 'P4', mounting: null }]).required).toBe(true);
	});
});

describe('checklist per mounting method', () => {
	const ids = (m: JobPlanPoint['mounting'], material?: 'aluminium') => pointChecklist({ mounting: m, material }).map((s) => s.id);
	test('stud: spot-face, drill and tap with the aluminium depths, torque', () => {
		expect(ids('stud')).toEqual(expect.arrayContaining(['lockout', 'eye-protection', 'spot-face', 'drill-tap', 'torque']));
		const drill = pointChecklist({ mounting: 'stud', material: 'aluminium' }).find((s) => s.id === 'drill-tap')!.text;
		expect(drill).toBe('Drill the 5.0 mm tap drill hole 18 mm deep, square to the seat, and tap M6 to at least 12 mm of full thread.');
	});
	test('bonded pad: grind, bond, cure, torque; no drilling', () => {
		const s = ids('bonded_pad');
		expect(s).toEqual(expect.arrayContaining(['grind-seat', 'bond-pad', 'cure', 'torque']));
		expect(s).not.toContain('drill-tap');
	});
	test('magnet: clean seat, no torque, no drilling, no eye-protection step', () => {
		const s = ids('magnet');
		expect(s).toContain('clean-seat');
		expect(s).not.toContain('torque');
		expect(s).not.toContain('drill-tap');
		expect(s).not.toContain('eye-protection');
	});
	test('safety steps are marked; hazardous area adds the permit first; no mounting, no checklist', () => {
		const steps = pointChecklist({ mounting: 'stud', hazardousArea: true });
		expect(steps[0]).toMatchObject({ id: 'permit', safety: true });
		expect(steps.filter((s) => s.safety).map((s) => s.id)).toEqual(
			expect.arrayContaining(['lockout', 'supply-off', 'measure-supply', 'fix-cable'])
		);
		expect(pointChecklist({ mounting: null })).toEqual([]);
	});
});

describe('jobTools', () => {
	test('stud jobs list the drilling and tapping tools with the thread and tap drill', () => {
		const tools = jobTools([{ mounting: 'stud' }]);
		expect(tools).toContain('Drill with depth stop and a 5.0 mm drill bit');
		expect(tools).toContain('M6 taps (taper and bottoming), tap wrench and cutting fluid');
		expect(tools).toContain('Personal lockout padlocks and tags');
		expect(tools).toContain('Torque wrench covering up to 10 N·m');
		expect(new Set(tools).size).toBe(tools.length);
	});
	test('a magnet-only job has no drill, no torque wrench and no lockout padlocks', () => {
		const tools = jobTools([{ mounting: 'magnet', cableLengthM: 5 }]);
		expect(tools.some((t) => /drill|Torque|padlock/i.test(t))).toBe(false);
		expect(tools).toContain('Multimeter (DC voltage and polarity at the sensor end)');
	});
	test('pads bring a grinder and the cure timer; hazardous areas a gas detector', () => {
		const tools = jobTools([{ mounting: 'bonded_pad', hazardousArea: true }]);
		expect(tools.some((t) => /^Grinder/.test(t))).toBe(true);
		expect(tools.some((t) => /timer for the cure wait/.test(t))).toBe(true);
		expect(tools[0]).toMatch(/Gas detector/);
	});
});

describe('billOfMaterials', () => {
	test('cable to cut: +15 % margin, rounded up to the metre per run (derived by hand)', () => {
		expect(CABLE_MARGIN).toBe(0.15);
		expect(cableToCutM(12)).toBe(14); // 12 × 1.15 = 13.8 → 14
		expect(cableToCutM(20)).toBe(23); // 20 × 1.15 = 23.0 exactly (22.999… in floating point) → 23
		expect(cableToCutM(7.3)).toBe(9); // 7.3 × 1.15 = 8.395 → 9
		expect(cableToCutM(10, 0.1)).toBe(11); // 11.000000000000002 in floating point → 11
		expect(cableToCutM(0)).toBe(0);
		expect(() => cableToCutM(-1)).toThrow(RangeError);
		expect(() => cableToCutM(Number.NaN)).toThrow(RangeError);
	});
	test('fixings: one every 0.3 m plus one at each end (derived by hand)', () => {
		expect(cableFixings(14)).toBe(48); // 14 / 0.3 = 46.7 → 47 intervals → 48 fixings
		expect(cableFixings(9)).toBe(31); // 9 / 0.3 = 30 intervals → 31 fixings
		expect(cableFixings(0)).toBe(1);
	});

	const job: JobPlanPoint[] = [
		{ label: 'P1', mounting: 'stud', material: 'aluminium', cableLengthM: 12, crossSectionMm2: 0.75 },
		{ label: 'P2', mounting: 'bonded_pad', cableLengthM: 20, crossSectionMm2: 0.75 },
		{ label: 'P3', mounting: 'magnet', cableLengthM: 7.3, crossSectionMm2: 0.5, conductorClass: 5 },
		{ label: 'P4', mounting: 'stud', material: 'steel', cableLengthM: null }
	];

	test('sums over the job: sensors, studs, pads, adhesive, magnets, couplant, cable per conductor, ties, connectors, ferrules (derived by hand)', () => {
		const lines: JobPackMaterialLine[] = billOfMaterials(job);
		const q = (item: string | RegExp) => {
			const l = lines.filter((x) => (typeof item === 'string' ? x.item === item : item.test(x.item)));
			expect(l, String(item)).toHaveLength(1);
			return l[0];
		};
		expect(q('Vibration sensor, 24 V DC')).toMatchObject({ quantity: 4, unit: 'pcs' });
		expect(q('M6 mounting stud')).toMatchObject({ quantity: 2, unit: 'pcs', note: 'Tapped-hole mounts: P1, P4.' });
		expect(q(/^Mounting pad/)).toMatchObject({ quantity: 1, unit: 'pcs' });
		expect(q(/adhesive/)).toMatchObject({ quantity: 1, unit: 'kit' });
		expect(q(/^Mounting magnet/)).toMatchObject({ quantity: 1 });
		expect(q('Couplant grease')).toMatchObject({ quantity: 1, unit: 'tube' });
		// 0.75 mm²: 14 m (P1) + 23 m (P2) = 37 m; 0.5 mm²: 9 m (P3).
		const c075 = q('Sensor cable, 2-core 0.75 mm² class 5');
		expect(c075).toMatchObject({ quantity: 37, unit: 'm' });
		expect(c075.note).toBe('2 runs, 32 m measured + 15 % margin, each run rounded up to the metre.');
		expect(q('Sensor cable, 2-core 0.5 mm² class 5')).toMatchObject({ quantity: 9, unit: 'm' });
		// P4 has no route: stated, not counted.
		expect(q('Sensor cable, length not measured')).toMatchObject({ quantity: 0 });
		expect(q('Sensor cable, length not measured').note).toMatch(/P4/);
		// 48 (14 m) + 78 (23 m: 76.7 → 77 intervals) + 31 (9 m) = 157.
		expect(q('Cable ties or clips')).toMatchObject({ quantity: 157, unit: 'pcs' });
		expect(q('Sensor cable connector, sensor end')).toMatchObject({ quantity: 4 });
		expect(q('Wire-end ferrules')).toMatchObject({ quantity: 6 }); // 3 runs × 2 conductors
	});
	test('adhesive kits and couplant tubes step up at 10 pads and 20 seats (assumed coverage)', () => {
		const pads = (n: number) => Array.from({ length: n }, (_, i) => ({ label: `P${i + 1}`, mounting: 'bonded_pad' as const }));
		const kits = (n: number) => billOfMaterials(pads(n)).find((l) => /adhesive/.test(l.item))!.quantity;
		expect(kits(10)).toBe(1);
		expect(kits(11)).toBe(2);
		expect(billOfMaterials(pads(21)).find((l) => l.item === 'Couplant grease')!.quantity).toBe(2);
	});
	test('a different margin is stated and used', () => {
		const l = billOfMaterials([{ mounting: 'stud', cableLengthM: 10, crossSectionMm2: 1 }], { margin: 0.25 });
		const cable = l.find((x) => x.unit === 'm')!;
		expect(cable.quantity).toBe(13); // 12.5 → 13
		expect(cable.note).toMatch(/25 % margin/);
		expect(() => billOfMaterials([], { margin: -0.1 })).toThrow(RangeError);
	});
	test('no points, no lines; a cable without a conductor size is named', () => {
		expect(billOfMaterials([])).toEqual([]);
		const l = billOfMaterials([{ label: 'P9', mounting: 'magnet', cableLengthM: 4 }]);
		expect(l.find((x) => x.unit === 'm')).toMatchObject({ quantity: 5, item: 'Sensor cable, 2-core cable, conductor size not chosen' });
		expect(l.find((x) => x.unit === 'm')!.note).toMatch(/Choose the conductor for P9/);
	});
});

describe('planJob', () => {
	test('one call gives per-point preparation, lockout, tools and materials', () => {
		const plan = planJob([
			{ label: 'P1', mounting: 'stud', material: 'aluminium', cableLengthM: 12, crossSectionMm2: 0.75 },
			{ label: 'P2', mounting: 'magnet', cableLengthM: 3, crossSectionMm2: 0.5 }
		]);
		expect(plan.cableMargin).toBe(CABLE_MARGIN);
		expect(plan.lockout.required).toBe(true);
		expect(plan.points[0].preparation.threadEngagementMm).toBe(12);
		expect(plan.points[0].torqueLimitNm).toBe(10);
		expect(plan.points[0].conductor).toBe('2-core 0.75 mm² class 5');
		expect(plan.points[0].checklist.some((s) => s.id === 'drill-tap')).toBe(true);
		expect(plan.points[1].torqueLimitNm).toBeNull();
		expect(plan.tools).toContain('Personal lockout padlocks and tags');
		expect(plan.materials.find((l) => l.item === 'Vibration sensor, 24 V DC')!.quantity).toBe(2);
	});
});
