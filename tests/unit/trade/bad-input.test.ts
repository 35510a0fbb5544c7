import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import {
	bearingFrequencies,
	cableVoltageDrop,
	displacementFromVelocity,
	evaluateMachine,
	evaluatePoint,
	maxCableLength,
	polylineLength,
	RULES,
	severityZone,
	velocityFromAcceleration,
	worstSeverity,
	type Finding,
	type PointEvaluationInput
} from '../../../src/lib/trade';

const cwru = { balls: 9, ballDiameter: 0.3126, pitchDiameter: 1.537 };

describe('calculators throw a RangeError naming the field', () => {
	const cases: Array<[string, () => unknown, RegExp]> = [
		['balls NaN', () => bearingFrequencies({ ...cwru, balls: Number.NaN }, 25), /bearing\.balls/],
		['balls fractional', () => bearingFrequencies({ ...cwru, balls: 8.5 }, 25), /bearing\.balls.*whole/],
		['balls too few', () => bearingFrequencies({ ...cwru, balls: 2 }, 25), /bearing\.balls/],
		['ball diameter negative', () => bearingFrequencies({ ...cwru, ballDiameter: -0.3 }, 25), /bearing\.ballDiameter/],
		['ball larger than pitch', () => bearingFrequencies({ ...cwru, ballDiameter: 2 }, 25), /ballDiameter.*smaller than.*pitchDiameter/],
		['balls do not fit', () => bearingFrequencies({ ...cwru, balls: 40 }, 25), /do not fit/],
		['contact angle 120°', () => bearingFrequencies({ ...cwru, contactAngleDeg: 120 }, 25), /contactAngleDeg/],
		['shaft speed infinite', () => bearingFrequencies(cwru, Infinity), /shaftHz/],
		['shaft speed negative', () => bearingFrequencies(cwru, -1), /shaftHz/],
		['geometry missing', () => bearingFrequencies(null as never, 25), /bearing must be an object/],
		['length negative', () => cableVoltageDrop({ lengthM: -1, crossSectionMm2: 1.5, currentA: 1 }), /lengthM/],
		['length absurd', () => cableVoltageDrop({ lengthM: 1e9, crossSectionMm2: 1.5, currentA: 1 }), /lengthM/],
		['current NaN', () => cableVoltageDrop({ lengthM: 10, crossSectionMm2: 1.5, currentA: Number.NaN }), /currentA/],
		['cross-section zero', () => cableVoltageDrop({ lengthM: 10, crossSectionMm2: 0, currentA: 1 }), /crossSectionMm2/],
		['class 3', () => cableVoltageDrop({ lengthM: 10, crossSectionMm2: 1.5, currentA: 1, conductorClass: 3 as never }), /conductorClass/],
		['temperature 1000 °C', () => cableVoltageDrop({ lengthM: 10, crossSectionMm2: 1.5, currentA: 1, temperatureC: 1000 }), /temperatureC/],
		['max length, supply NaN', () => maxCableLength({ crossSectionMm2: 1, currentA: 1, supplyV: Number.NaN, minV: 20 }), /supplyV/],
		['frequency zero', () => velocityFromAcceleration(9.8, 0), /freqHz/],
		['acceleration negative', () => velocityFromAcceleration(-1, 100), /accelMS2/],
		['velocity string', () => displacementFromVelocity('3' as never, 100), /velocityMS.*"3"/],
		['zone velocity NaN', () => severityZone({ group: 1, foundation: 'rigid', velocityMmS: Number.NaN }), /velocityMmS/],
		['zone velocity negative', () => severityZone({ group: 1, foundation: 'rigid', velocityMmS: -0.1 }), /velocityMmS/],
		['zone group 3', () => severityZone({ group: 3 as never, foundation: 'rigid', velocityMmS: 1 }), /group/],
		['zone foundation', () => severityZone({ group: 1, foundation: 'soft' as never, velocityMmS: 1 }), /foundation/],
		[
			'polyline point',
			() =>
				polylineLength([
					[0, 0],
					[Number.NaN, 1]
				]),
			/points\[1\]\[0\]/
		]
	];
	test.each(cases)('%s', (_name, call, message) => {
		expect(call).toThrow(RangeError);
		expect(call).toThrow(message);
	});
});

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
			material: 'steel'
		},
		route: { lengthM: 20, crossSectionMm2: 0.5, supplyV: 24, crossesKeepOut: false }
	};
}

const invalid = (fs: Finding[]) => fs.filter((f) => f.rule === 'input.invalid');

describe('evaluatePoint turns bad input into a fail finding', () => {
	test('NaN wall thickness: a fail naming the field, and no wall verdict', () => {
		const g = good();
		const fs = evaluatePoint({ ...g, point: { ...g.point, wallThicknessMm: Number.NaN } });
		expect(invalid(fs)).toHaveLength(1);
		expect(invalid(fs)[0].severity).toBe('fail');
		expect(invalid(fs)[0].message).toMatch(/Wall thickness is not a number.*point\.wallThicknessMm/);
		expect(fs.some((f) => f.rule === 'hole.wall-thickness')).toBe(false);
		expect(worstSeverity(fs)).toBe('fail');
	});

	const cases: Array<[string, (g: PointEvaluationInput) => unknown, RegExp]> = [
		['negative distance', (g) => ({ ...g, point: { ...g.point, distanceToBearingMm: -5 } }), /point\.distanceToBearingMm/],
		['absurd temperature', (g) => ({ ...g, point: { ...g.point, surfaceTempC: 5000 } }), /point\.surfaceTempC/],
		['string number', (g) => ({ ...g, point: { ...g.point, flatDiameterMm: '30' } }), /point\.flatDiameterMm/],
		['unknown surface', (g) => ({ ...g, point: { ...g.point, surface: 'wood' } }), /point\.surface/],
		['unknown mounting', (g) => ({ ...g, point: { ...g.point, mounting: 'glue' } }), /point\.mounting/],
		['infinite speed', (g) => ({ ...g, machine: { ...g.machine, speedRpm: Infinity } }), /machine\.speedRpm/],
		['zero speed', (g) => ({ ...g, machine: { ...g.machine, speedRpm: 0 } }), /machine\.speedRpm/],
		['speed missing', (g) => ({ ...g, machine: { ...g.machine, speedRpm: undefined } }), /machine\.speedRpm/],
		['speed mode missing', (g) => ({ ...g, machine: { ...g.machine, speedMode: undefined } }), /machine\.speedMode/],
		['hazardous flag as text', (g) => ({ ...g, machine: { ...g.machine, hazardousArea: 'no' } }), /machine\.hazardousArea/],
		['machine missing', (g) => ({ ...g, machine: undefined }), /machine/],
		['point missing', (g) => ({ ...g, point: null }), /point/],
		['route crossing as text', (g) => ({ ...g, route: { ...g.route, crossesKeepOut: 'no' } }), /route\.crossesKeepOut/],
		['route length negative', (g) => ({ ...g, route: { ...g.route, lengthM: -10 } }), /route\.lengthM/],
		['route as a string', (g) => ({ ...g, route: 'long' }), /route/],
		['conductor class 4', (g) => ({ ...g, route: { ...g.route, conductorClass: 4 } }), /route\.conductorClass/],
		['material unknown word', (g) => ({ ...g, point: { ...g.point, material: 'brass' } }), /point\.material/]
	];
	test.each(cases)('%s', (_name, make, field) => {
		const fs = evaluatePoint(make(good()) as PointEvaluationInput);
		const bad = invalid(fs);
		expect(bad.length).toBeGreaterThanOrEqual(1);
		expect(bad.some((f) => field.test(f.message))).toBe(true);
		expect(worstSeverity(fs)).toBe('fail');
	});

	test('no input at all', () => {
		for (const input of [null, undefined, 42, 'point', []]) {
			const fs = evaluatePoint(input as never);
			expect(worstSeverity(fs)).toBe('fail');
			expect(invalid(fs)).toHaveLength(1);
		}
	});

	test('never throws and never passes when a numeric field is garbage (property)', () => {
		// Values no field accepts, plus a too-low value per field (temperatures may be below zero).
		const anyField = fc.oneof(
			fc.constant(Number.NaN),
			fc.constant(Infinity),
			fc.constant(-Infinity),
			fc.double({ min: 1e7, noNaN: true }),
			fc.string(),
			fc.boolean(),
			fc.object()
		);
		const tooLow = (limit: number) => fc.double({ max: limit - 1e-9, noNaN: true });
		const fieldAndValue = fc.oneof(
			...(
				[
					['point', 'flatDiameterMm', 0],
					['point', 'wallThicknessMm', 0],
					['point', 'distanceToBearingMm', 0],
					['point', 'surfaceTempC', -100],
					['machine', 'speedRpm', 1e-9],
					['route', 'lengthM', 0],
					['route', 'crossSectionMm2', 1e-9],
					['route', 'supplyV', 0],
					['route', 'currentA', 0]
				] as const
			).map(([part, key, min]) => fc.tuple(fc.constant([part, key] as const), fc.oneof(anyField, tooLow(min))))
		);
		fc.assert(
			fc.property(fieldAndValue, ([[part, key], value]) => {
				const g = good() as unknown as Record<string, Record<string, unknown>>;
				g[part] = { ...g[part], [key]: value };
				const fs = evaluatePoint(g as unknown as PointEvaluationInput);
				expect(worstSeverity(fs)).toBe('fail');
				expect(invalid(fs).some((f) => f.message.includes(`${part}.${key}`))).toBe(true);
			})
		);
	});

	test('arbitrary values anywhere never crash and only use catalogued rules', () => {
		const ids = new Set(RULES.map((r) => r.id));
		fc.assert(
			fc.property(fc.anything(), fc.anything(), fc.anything(), fc.option(fc.anything()), (machine, point, route, thresholds) => {
				const fs = evaluatePoint({ machine, point, route } as never, thresholds as never);
				expect(Array.isArray(fs)).toBe(true);
				for (const f of fs) {
					expect(ids.has(f.rule)).toBe(true);
					expect(['pass', 'warn', 'fail']).toContain(f.severity);
				}
			})
		);
	});
});

describe('evaluateMachine turns bad input into a fail finding', () => {
	const m = (over: Record<string, unknown> = {}, points: unknown = []) =>
		({
			machine: {
				speedRpm: 1500,
				speedMode: 'constant',
				hasSpeedSignal: false,
				hazardousArea: false,
				bearings: [{ position: 'DE', ...cwru }],
				...over
			},
			points
		}) as never;

	test('bearing ball larger than pitch diameter: a fail naming the bearing', () => {
		const r = evaluateMachine(m({ bearings: [{ position: 'DE', balls: 9, ballDiameter: 2, pitchDiameter: 1.5 }] }));
		const bad = r.machine.filter((f) => f.rule === 'input.invalid');
		expect(bad).toHaveLength(1);
		expect(bad[0].message).toMatch(/machine\.bearings\[0\]/);
		expect(r.worst).toBe('fail');
	});
	test('partial bearing geometry is a fail, not a silent skip', () => {
		const r = evaluateMachine(m({ bearings: [{ position: 'DE', balls: 9 }] }));
		expect(r.machine.some((f) => f.rule === 'input.invalid' && /ballDiameter/.test(f.message))).toBe(true);
	});
	test('points and bearings that are not lists', () => {
		expect(evaluateMachine(m({}, 'p1')).worst).toBe('fail');
		expect(evaluateMachine(m({ bearings: 'DE' })).worst).toBe('fail');
	});
	test('a bad point fails that point, keeps its place and id', () => {
		const r = evaluateMachine(m({}, [{ id: 'p1', surface: 'machined_housing', mounting: 'stud', wallThicknessMm: Number.NaN }, 7]));
		expect(r.points.map((p) => [p.id, p.worst])).toEqual([
			['p1', 'fail'],
			['#2', 'fail']
		]);
	});
	test('never throws on arbitrary input', () => {
		fc.assert(
			fc.property(fc.anything(), fc.anything(), (machine, points) => {
				const r = evaluateMachine({ machine, points } as never);
				expect(['pass', 'warn', 'fail']).toContain(r.worst);
				// Without a usable machine record the result can never be a pass.
				if (typeof machine !== 'object' || machine === null) expect(r.worst).toBe('fail');
			})
		);
	});
});
