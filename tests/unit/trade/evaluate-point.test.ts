import { describe, expect, test } from 'vitest';
import { evaluatePoint, worstSeverity, type Finding, type PointEvaluationInput, type Thresholds } from '../../../src/lib/trade';

/** A point that meets every rule with the default thresholds. */
function good(): PointEvaluationInput {
	return {
		machine: { speedRpm: 1480, speedMode: 'constant', hasSpeedSignal: false, hazardousArea: false },
		point: {
			surface: 'machined_housing',
			mounting: 'stud',
			flatDiameterMm: 40,
			wallThicknessMm: 20,
			distanceToBearingMm: 30,
			surfaceTempC: 50,
			material: 'cast_iron'
		},
		route: { lengthM: 20, crossSectionMm2: 0.5, supplyV: 24, crossesKeepOut: false, fixed: true }
	};
}

type Patch = {
	machine?: Partial<PointEvaluationInput['machine']>;
	point?: Partial<PointEvaluationInput['point']>;
	route?: Partial<NonNullable<PointEvaluationInput['route']>> | null;
};

function run(patch: Patch = {}, thresholds?: Partial<Thresholds>): Finding[] {
	const g = good();
	const input: PointEvaluationInput = {
		machine: { ...g.machine, ...patch.machine },
		point: { ...g.point, ...patch.point },
		route: patch.route === null ? undefined : { ...g.route!, ...patch.route }
	};
	return evaluatePoint(input, thresholds);
}

function only(findings: Finding[], rule: string): Finding {
	const hits = findings.filter((f) => f.rule === rule);
	expect(hits, `exactly one ${rule} finding`).toHaveLength(1);
	return hits[0];
}

function none(findings: Finding[], rule: string) {
	expect(findings.filter((f) => f.rule === rule)).toEqual([]);
}

describe('evaluatePoint: a good point', () => {
	test('passes every rule, and every finding carries a reference', () => {
		const findings = run();
		expect(findings.filter((f) => f.severity !== 'pass')).toEqual([]);
		expect(worstSeverity(findings)).toBe('pass');
		for (const f of findings) {
			expect(f.reference.length).toBeGreaterThan(0);
			expect(f.message.length).toBeGreaterThan(0);
		}
		// A stud point with a route checks all of these.
		expect(new Set(findings.map((f) => f.rule))).toEqual(
			new Set([
				'surface.solid-metal',
				'seat.flat-diameter',
				'hole.wall-thickness',
				'hole.thread-engagement',
				'distance.bearing',
				'surface.temperature',
				'route.drawn',
				'route.keep-out',
				'route.fixing',
				'route.supply-voltage',
				'machine.speed',
				'machine.speed-signal',
				'machine.hazardous-area'
			])
		);
	});
});

describe('surface.solid-metal (common practice; ISO 10816-1 / 13373-1 measure on housings, from memory)', () => {
	test.each(['machined_housing', 'cast_housing', 'solid_casting'] as const)('%s passes', (surface) => {
		expect(only(run({ point: { surface } }), 'surface.solid-metal').severity).toBe('pass');
	});
	test('a sheet-metal cover point fails and says to move it to the housing', () => {
		const f = only(run({ point: { surface: 'sheet_cover' } }), 'surface.solid-metal');
		expect(f.severity).toBe('fail');
		expect(f.message).toMatch(/cover/i);
		expect(f.message).toMatch(/bearing housing/i);
	});
	test('fins fail', () => {
		expect(only(run({ point: { surface: 'finned' } }), 'surface.solid-metal').severity).toBe('fail');
	});
	test('"other" asks for a check', () => {
		const f = only(run({ point: { surface: 'other' } }), 'surface.solid-metal');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/confirm/i);
	});
});

describe('seat.flat-diameter (common practice: at least 30 mm)', () => {
	test('30 mm passes (the limit is "at least")', () => {
		const f = only(run({ point: { flatDiameterMm: 30 } }), 'seat.flat-diameter');
		expect(f).toMatchObject({ severity: 'pass', value: 30, limit: 30 });
	});
	test('a 25 mm flat fails', () => {
		const f = only(run({ point: { flatDiameterMm: 25 } }), 'seat.flat-diameter');
		expect(f).toMatchObject({ severity: 'fail', value: 25, limit: 30 });
		expect(f.message).toMatch(/25 mm/);
		expect(f.message).toMatch(/30 mm/);
	});
	test('not measured: says what to measure', () => {
		const f = only(run({ point: { flatDiameterMm: undefined } }), 'seat.flat-diameter');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/^Measure the flat/);
	});
	test('null (an empty database column) counts as not measured', () => {
		expect(only(run({ point: { flatDiameterMm: null } }), 'seat.flat-diameter').severity).toBe('warn');
	});
});

describe('hole.wall-thickness (common practice: 15 mm hole, 9 mm thread for M6)', () => {
	test('15 mm passes', () => {
		expect(only(run({ point: { wallThicknessMm: 15 } }), 'hole.wall-thickness')).toMatchObject({ severity: 'pass', value: 15, limit: 15 });
	});
	test('a 12 mm wall with a stud fails and advises bonding a pad', () => {
		const f = only(run({ point: { wallThicknessMm: 12 } }), 'hole.wall-thickness');
		expect(f).toMatchObject({ severity: 'fail', value: 12, limit: 15 });
		expect(f.message).toMatch(/12 mm/);
		expect(f.message).toMatch(/bond a mounting pad/i);
	});
	test('not measured: warns and names the gauge', () => {
		const f = only(run({ point: { wallThicknessMm: undefined } }), 'hole.wall-thickness');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/Measure the wall thickness/);
	});
	test('a 12 mm wall with a bonded pad is fine: no hole is drilled', () => {
		const findings = run({ point: { wallThicknessMm: 12, mounting: 'bonded_pad' } });
		none(findings, 'hole.wall-thickness');
		none(findings, 'hole.thread-engagement');
		expect(worstSeverity(findings)).toBe('pass');
	});
});

describe('hole.thread-engagement (common practice, machine-design tables: 1.0·d steel, 1.5·d cast iron, 2·d aluminium)', () => {
	test('steel with a 15 mm wall passes', () => {
		expect(only(run({ point: { material: 'steel', wallThicknessMm: 15 } }), 'hole.thread-engagement').severity).toBe('pass');
	});
	test('aluminium needs 2 × 6 = 12 mm of thread, so a 16 mm wall fails although it passes the general wall rule', () => {
		const findings = run({ point: { material: 'aluminium', wallThicknessMm: 16 } });
		expect(only(findings, 'hole.wall-thickness').severity).toBe('pass');
		const f = only(findings, 'hole.thread-engagement');
		// 12 mm thread + (15 − 9) mm beyond the thread = 18 mm.
		expect(f).toMatchObject({ severity: 'fail', value: 16, limit: 18 });
		expect(f.message).toMatch(/aluminium/);
		expect(f.message).toMatch(/12 mm of thread/);
	});
	test('aluminium with an 18 mm wall passes', () => {
		expect(only(run({ point: { material: 'aluminium', wallThicknessMm: 18 } }), 'hole.thread-engagement').severity).toBe('pass');
	});
	test('material not recorded: warns about aluminium', () => {
		const f = only(run({ point: { material: undefined } }), 'hole.thread-engagement');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/Record the housing material/);
	});
	test('material known but wall not measured: warns with the depth needed', () => {
		const f = only(run({ point: { material: 'aluminium', wallThicknessMm: undefined } }), 'hole.thread-engagement');
		expect(f).toMatchObject({ severity: 'warn', limit: 18 });
	});
});

describe('mounting.magnet-temporary (common practice)', () => {
	test('a magnet on a permanent point warns and suggests a stud or pad', () => {
		const f = only(run({ point: { mounting: 'magnet' } }), 'mounting.magnet-temporary');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/stud/);
	});
	test('a magnet on a temporary point passes', () => {
		expect(only(run({ point: { mounting: 'magnet', purpose: 'temporary' } }), 'mounting.magnet-temporary').severity).toBe('pass');
	});
	test('not reported for a stud', () => {
		none(run(), 'mounting.magnet-temporary');
	});
});

describe('distance.bearing (common practice: warn above 75 mm, fail above 150 mm)', () => {
	test('75 mm passes: only distances above the limit warn', () => {
		expect(only(run({ point: { distanceToBearingMm: 75 } }), 'distance.bearing')).toMatchObject({ severity: 'pass', value: 75 });
	});
	test('76 mm warns', () => {
		expect(only(run({ point: { distanceToBearingMm: 76 } }), 'distance.bearing')).toMatchObject({ severity: 'warn', limit: 75 });
	});
	test('150 mm still warns; 151 mm fails', () => {
		expect(only(run({ point: { distanceToBearingMm: 150 } }), 'distance.bearing').severity).toBe('warn');
		const f = only(run({ point: { distanceToBearingMm: 151 } }), 'distance.bearing');
		expect(f).toMatchObject({ severity: 'fail', value: 151, limit: 150 });
		expect(f.message).toMatch(/closer|as close/i);
	});
	test('not measured: warns', () => {
		const f = only(run({ point: { distanceToBearingMm: undefined } }), 'distance.bearing');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/Measure the distance/);
	});
});

describe('surface.temperature (from memory: default 80 °C)', () => {
	test('80 °C passes, 81 °C fails', () => {
		expect(only(run({ point: { surfaceTempC: 80 } }), 'surface.temperature').severity).toBe('pass');
		const f = only(run({ point: { surfaceTempC: 81 } }), 'surface.temperature');
		expect(f).toMatchObject({ severity: 'fail', value: 81, limit: 80 });
	});
	test('not measured: warns', () => {
		expect(only(run({ point: { surfaceTempC: undefined } }), 'surface.temperature').severity).toBe('warn');
	});
});

describe('machine.speed (Kim, Tan & Kosse 2008: 600 r/min)', () => {
	test('600 r/min passes, 599 r/min warns as a low-speed machine', () => {
		expect(only(run({ machine: { speedRpm: 600 } }), 'machine.speed').severity).toBe('pass');
		const f = only(run({ machine: { speedRpm: 599 } }), 'machine.speed');
		expect(f).toMatchObject({ severity: 'warn', value: 599, limit: 600 });
		expect(f.message).toMatch(/Low-speed/);
	});
});

describe('machine.speed-signal (common practice)', () => {
	test('variable speed without a speed signal warns', () => {
		expect(only(run({ machine: { speedMode: 'variable', hasSpeedSignal: false } }), 'machine.speed-signal').severity).toBe('warn');
	});
	test('variable speed with a speed signal passes; constant speed passes', () => {
		expect(only(run({ machine: { speedMode: 'variable', hasSpeedSignal: true } }), 'machine.speed-signal').severity).toBe('pass');
		expect(only(run({ machine: { speedMode: 'constant', hasSpeedSignal: false } }), 'machine.speed-signal').severity).toBe('pass');
	});
});

describe('machine.hazardous-area (common practice: never passes silently)', () => {
	test('hazardous area warns with certified equipment and a permit', () => {
		const f = only(run({ machine: { hazardousArea: true } }), 'machine.hazardous-area');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/certified/);
		expect(f.message).toMatch(/permit/);
	});
	test('not hazardous passes', () => {
		expect(only(run(), 'machine.hazardous-area').severity).toBe('pass');
	});
});

describe('route rules', () => {
	test('route.drawn: no route yet warns', () => {
		const findings = run({ route: null });
		expect(only(findings, 'route.drawn').severity).toBe('warn');
		none(findings, 'route.keep-out');
		none(findings, 'route.supply-voltage');
	});
	test('route.keep-out: crossing fails, clear passes', () => {
		const f = only(run({ route: { crossesKeepOut: true } }), 'route.keep-out');
		expect(f.severity).toBe('fail');
		expect(f.message).toMatch(/Re-route/);
		expect(only(run(), 'route.keep-out').severity).toBe('pass');
	});
	test('route.fixing: not fixed warns, fixed passes, not stated says nothing', () => {
		expect(only(run({ route: { fixed: false } }), 'route.fixing').severity).toBe('warn');
		expect(only(run({ route: { fixed: true } }), 'route.fixing').severity).toBe('pass');
		none(run({ route: { fixed: undefined } }), 'route.fixing');
	});
});

describe('route.supply-voltage (IEC 61131-2 range; IEC 60228 resistance)', () => {
	test('measured supply, short run: passes with the voltage at the sensor', () => {
		// IEC 60228 class 5, 0.5 mm²: 39.0 Ω/km. 2 × 20 m × 0.03 A × 0.039 Ω/m = 0.0468 V; 24 − 0.0468 = 23.9532 V.
		const f = only(run(), 'route.supply-voltage');
		expect(f.severity).toBe('pass');
		expect(f.value).toBeCloseTo(23.9532, 6);
		expect(f.limit).toBe(20.4);
	});
	test('supply not measured: warns and works with 24 V nominal', () => {
		const f = only(run({ route: { supplyV: undefined } }), 'route.supply-voltage');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/Measure the voltage at the supply point/);
		expect(f.value).toBeCloseTo(23.9532, 6);
	});
	test('too much drop fails and suggests a conductor size that works', () => {
		// 2 × 100 m × 1 A × 0.039 Ω/m = 7.8 V; 24 − 7.8 = 16.2 V < 20.4 V. With 1.5 mm² (13.3 Ω/km):
		// 2.66 V, 21.34 V left; 1.0 mm² (19.5 Ω/km) would drop 3.9 V and leave 20.1 V, too little.
		const f = only(run({ route: { lengthM: 100, currentA: 1 } }), 'route.supply-voltage');
		expect(f.severity).toBe('fail');
		expect(f.value).toBeCloseTo(16.2, 9);
		expect(f.message).toMatch(/Use 1\.5 mm²/);
	});
	test('a supply above the maximum fails', () => {
		const f = only(run({ route: { supplyV: 30 } }), 'route.supply-voltage');
		expect(f).toMatchObject({ severity: 'fail', value: 30, limit: 28.8 });
	});
	test('the cable temperature is taken into account', () => {
		// 2 × 20 × 0.03 × 0.039 × (1 + 0.00393 × 40) = 0.0541570 V at 60 °C (IEC 60028 coefficient).
		const f = only(run({ route: { temperatureC: 60 } }), 'route.supply-voltage');
		expect(f.value).toBeCloseTo(24 - 0.054157, 6);
	});
	test('an unlisted conductor size asks for a standard one', () => {
		const f = only(run({ route: { crossSectionMm2: 0.34 } }), 'route.supply-voltage');
		expect(f.severity).toBe('warn');
		expect(f.message).toMatch(/0\.5, 0\.75, 1, 1\.5, 2\.5/);
	});
});

describe('threshold overrides', () => {
	test('a 25 mm flat passes when the organisation sets 20 mm', () => {
		expect(only(run({ point: { flatDiameterMm: 25 } }, { minFlatDiameterMm: 20 }), 'seat.flat-diameter')).toMatchObject({
			severity: 'pass',
			limit: 20
		});
	});
	test('a 12 mm wall passes when the organisation sets 12 mm / 8 mm thread', () => {
		expect(
			only(
				run({ point: { wallThicknessMm: 12, material: 'steel' } }, { minWallThicknessStudMm: 12, minThreadDepthMm: 8 }),
				'hole.wall-thickness'
			).severity
		).toBe('pass');
	});
	test('distance and temperature limits move', () => {
		expect(only(run({ point: { distanceToBearingMm: 90 } }, { distanceWarnMm: 100 }), 'distance.bearing').severity).toBe('pass');
		expect(only(run({ point: { distanceToBearingMm: 90 } }, { distanceFailMm: 80, distanceWarnMm: 50 }), 'distance.bearing').severity).toBe(
			'fail'
		);
		expect(only(run({ point: { surfaceTempC: 95 } }, { maxSurfaceTempC: 120 }), 'surface.temperature').severity).toBe('pass');
	});
	test('speed floor and sensor current move', () => {
		expect(only(run({ machine: { speedRpm: 500 } }, { minSpeedRpm: 300 }), 'machine.speed').severity).toBe('pass');
		// 2 × 20 × 0.5 A × 0.039 = 0.78 V; 24 − 0.78 = 23.22 V.
		expect(only(run({}, { sensorCurrentA: 0.5 }), 'route.supply-voltage').value).toBeCloseTo(23.22, 9);
	});
	test('bad overrides are a fail, and the defaults are used for the rest', () => {
		const findings = run({ point: { flatDiameterMm: 25 } }, { minFlatDiameterMm: -5 } as Partial<Thresholds>);
		const bad = findings.filter((f) => f.rule === 'input.invalid');
		expect(bad).toHaveLength(1);
		expect(bad[0].severity).toBe('fail');
		expect(bad[0].message).toMatch(/minFlatDiameterMm/);
		expect(only(findings, 'seat.flat-diameter')).toMatchObject({ severity: 'fail', limit: 30 });
	});
	test('one overrides object used for many points gives each the same findings as a fresh copy would', () => {
		const shared = { minFlatDiameterMm: 20 } as Partial<Thresholds>;
		for (const flat of [25, 15, 25]) {
			expect(run({ point: { flatDiameterMm: flat } }, shared)).toEqual(run({ point: { flatDiameterMm: flat } }, { ...shared }));
		}
		const bad = { minFlatDiameterMm: -5 } as Partial<Thresholds>;
		const first = run({}, bad).filter((f) => f.rule === 'input.invalid');
		first[0].message = 'changed by the caller';
		// A finding handed out is the caller's: the next point gets its own, unchanged.
		expect(run({}, bad).filter((f) => f.rule === 'input.invalid')[0].message).toMatch(/minFlatDiameterMm/);
	});
});
