import { describe, expect, test } from 'vitest';
import {
	evaluateMachine,
	type Finding,
	type MachineEvaluationInput,
	type MachinePointInput,
	type Thresholds
} from '../../../src/lib/trade';

// CWRU drive-end bearing geometry (Case Western Reserve University Bearing Data Center), in inches.
const cwru = { balls: 9, ballDiameter: 0.3126, pitchDiameter: 1.537 };

function point(
	id: string,
	bearing: string,
	direction: MachinePointInput['direction'],
	mounting: MachinePointInput['mounting'] = 'stud'
): MachinePointInput {
	return {
		id,
		bearing,
		direction,
		surface: 'machined_housing',
		mounting,
		purpose: mounting === 'magnet' ? 'temporary' : undefined,
		flatDiameterMm: 40,
		wallThicknessMm: 20,
		distanceToBearingMm: 30,
		surfaceTempC: 50,
		material: 'steel',
		route: { lengthM: 10, crossSectionMm2: 0.5, supplyV: 24, crossesKeepOut: false }
	};
}

function machine(over: Partial<MachineEvaluationInput['machine']> = {}, points: MachinePointInput[] = []): MachineEvaluationInput {
	return {
		machine: {
			speedRpm: 1797,
			speedMode: 'constant',
			hasSpeedSignal: false,
			hazardousArea: false,
			bearings: [
				{ position: 'DE', ...cwru },
				{ position: 'NDE', ...cwru }
			],
			...over
		},
		points
	};
}

const byRule = (fs: Finding[], rule: string) => fs.filter((f) => f.rule === rule);

describe('evaluateMachine: coverage of bearing housings', () => {
	test('a radial point on each monitored bearing passes', () => {
		const r = evaluateMachine(machine({}, [point('p1', 'DE', 'radial_h'), point('p2', 'NDE', 'radial_v')]));
		const radial = byRule(r.machine, 'direction.radial');
		expect(radial.map((f) => f.severity)).toEqual(['pass', 'pass']);
		expect(r.worst).toBe('pass');
	});

	test('a bearing with only an axial point fails, naming the bearing', () => {
		const r = evaluateMachine(machine({}, [point('p1', 'DE', 'radial_h'), point('p2', 'NDE', 'axial')]));
		const fails = byRule(r.machine, 'direction.radial').filter((f) => f.severity === 'fail');
		expect(fails).toHaveLength(1);
		expect(fails[0].message).toMatch(/The non-drive end \(NDE\) bearing has no radial point/);
		expect(r.worst).toBe('fail');
	});

	test('a bearing not monitored needs no point', () => {
		const m = machine(
			{
				bearings: [
					{ position: 'DE', ...cwru },
					{ position: 'NDE', ...cwru, monitored: false }
				]
			},
			[point('p1', 'DE', 'radial_h')]
		);
		expect(byRule(evaluateMachine(m).machine, 'direction.radial').map((f) => f.severity)).toEqual(['pass']);
	});

	test('points without a direction do not count', () => {
		const r = evaluateMachine(machine({}, [point('p1', 'DE', null), point('p2', 'NDE', 'radial_v')]));
		expect(
			byRule(r.machine, 'direction.radial')
				.map((f) => f.severity)
				.sort()
		).toEqual(['fail', 'pass']);
	});

	test('axial point asked for but missing warns; present passes', () => {
		const bearings = [{ position: 'DE', ...cwru, axialWanted: true }];
		const missing = evaluateMachine(machine({ bearings }, [point('p1', 'DE', 'radial_h')]));
		expect(byRule(missing.machine, 'direction.axial').map((f) => f.severity)).toEqual(['warn']);
		const present = evaluateMachine(machine({ bearings }, [point('p1', 'DE', 'radial_h'), point('p2', 'DE', 'axial')]));
		expect(byRule(present.machine, 'direction.axial').map((f) => f.severity)).toEqual(['pass']);
	});

	test('positions as stored (drive_end / non_drive_end) and custom labels are named in words', () => {
		const m = machine(
			{
				bearings: [
					{ position: 'drive_end', ...cwru },
					{ position: 'non_drive_end', label: 'fan-side motor', ...cwru }
				]
			},
			[point('p1', 'drive_end', 'radial_h')]
		);
		const radial = byRule(evaluateMachine(m).machine, 'direction.radial');
		expect(radial[0]).toMatchObject({ severity: 'pass' });
		expect(radial[0].message).toMatch(/The drive end \(DE\) bearing has a radial horizontal point/);
		expect(radial[1]).toMatchObject({ severity: 'fail' });
		expect(radial[1].message).toMatch(/The fan-side motor bearing has no radial point/);
	});

	test('no bearings recorded warns', () => {
		const r = evaluateMachine(machine({ bearings: [] }, [point('p1', 'DE', 'radial_h')]));
		expect(byRule(r.machine, 'direction.radial')).toMatchObject([{ severity: 'warn' }]);
	});
});

describe('evaluateMachine: machine-level rules', () => {
	test('speed, speed signal and hazardous area are reported once, at machine level', () => {
		const r = evaluateMachine(
			machine({ speedRpm: 400, speedMode: 'variable', hasSpeedSignal: false, hazardousArea: true }, [
				point('p1', 'DE', 'radial_h'),
				point('p2', 'NDE', 'radial_h')
			])
		);
		expect(byRule(r.machine, 'machine.speed')).toMatchObject([{ severity: 'warn', value: 400, limit: 600 }]);
		expect(byRule(r.machine, 'machine.speed-signal')).toMatchObject([{ severity: 'warn' }]);
		expect(byRule(r.machine, 'machine.hazardous-area')).toMatchObject([{ severity: 'warn' }]);
		for (const p of r.points) expect(p.findings.some((f) => f.rule.startsWith('machine.'))).toBe(false);
		expect(r.worst).toBe('warn');
	});

	test('point findings are kept per point with their worst', () => {
		const bad = { ...point('p2', 'NDE', 'radial_h'), surface: 'sheet_cover' as const };
		const r = evaluateMachine(machine({}, [point('p1', 'DE', 'radial_h'), bad]));
		expect(r.points.map((p) => [p.id, p.worst])).toEqual([
			['p1', 'pass'],
			['p2', 'fail']
		]);
		expect(r.worst).toBe('fail');
	});
});

describe('mounting.usable-frequency', () => {
	test('the frequency of interest is 3 × the highest BPFI at running speed', () => {
		// CWRU BPFI 5.4152 × f_r; 1797 r/min = 29.95 Hz; 3 × 5.4152 × 29.95 = 486.55 Hz.
		const r = evaluateMachine(machine({}, [point('p1', 'DE', 'radial_h')]));
		expect(r.frequencyOfInterestHz).toBeCloseTo(3 * 5.4152 * 29.95, 0);
		expect(r.bearingFrequencies.map((b) => b.position)).toEqual(['DE', 'NDE']);
		expect(byRule(r.points[0].findings, 'mounting.usable-frequency')).toMatchObject([{ severity: 'pass' }]);
	});

	test('at 30 000 r/min a magnet falls short; a pad and a stud still reach', () => {
		// 30 000 r/min = 500 Hz; 3 × 5.4152 × 500 = 8122.8 Hz. Defaults (from memory, Harris' handbook ordering):
		// stud 10 000 Hz, pad 0.85 × 10 000 = 8500 Hz, magnet 5000 Hz.
		const r = evaluateMachine(
			machine({ speedRpm: 30000 }, [
				point('s', 'DE', 'radial_h', 'stud'),
				point('p', 'DE', 'radial_v', 'bonded_pad'),
				point('m', 'NDE', 'radial_h', 'magnet')
			])
		);
		expect(r.frequencyOfInterestHz).toBeCloseTo(8122.8, 0);
		const sev = Object.fromEntries(r.points.map((p) => [p.id, byRule(p.findings, 'mounting.usable-frequency')[0]]));
		expect(sev.s).toMatchObject({ severity: 'pass', limit: 10000 });
		expect(sev.p).toMatchObject({ severity: 'pass', limit: 8500 });
		expect(sev.m).toMatchObject({ severity: 'fail', limit: 5000 });
		expect(sev.m.message).toMatch(/stud/);
	});

	test('thresholds change the outcome', () => {
		const m = machine({ speedRpm: 30000 }, [point('m', 'DE', 'radial_h', 'magnet')]);
		const t: Partial<Thresholds> = { frequencyOfInterestFactor: 1 };
		expect(byRule(evaluateMachine(m, t).points[0].findings, 'mounting.usable-frequency')[0].severity).toBe('pass');
	});

	test('an explicit frequency of interest overrides the bearing figure', () => {
		const r = evaluateMachine(machine({ frequencyOfInterestHz: 9000 }, [point('p', 'DE', 'radial_h', 'bonded_pad')]));
		expect(r.frequencyOfInterestHz).toBe(9000);
		expect(byRule(r.points[0].findings, 'mounting.usable-frequency')[0].severity).toBe('fail');
	});

	test('missing bearing geometry warns and names the bearing', () => {
		const r = evaluateMachine(machine({ bearings: [{ position: 'DE' }, { position: 'NDE', ...cwru }] }, [point('p', 'DE', 'radial_h')]));
		const w = byRule(r.machine, 'mounting.usable-frequency');
		expect(w).toMatchObject([{ severity: 'warn' }]);
		expect(w[0].message).toMatch(/drive end \(DE\) bearing/);
		// The NDE geometry still gives a frequency of interest.
		expect(r.frequencyOfInterestHz).toBeGreaterThan(0);
	});
});
