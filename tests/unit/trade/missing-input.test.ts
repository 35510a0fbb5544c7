import { describe, expect, it } from 'vitest';
import { evaluatePoint } from '../../../src/lib/trade';

const machine = { speedRpm: 1480, speedMode: 'constant', hasSpeedSignal: false, hazardousArea: false } as const;

describe('missing input is told apart from wrong input', () => {
	it('a choice not made yet is a fail flagged as missing, naming the field', () => {
		const f = evaluatePoint({ machine, point: { surface: undefined as never, mounting: 'stud' } });
		const surface = f.find((x) => x.field === 'point.surface');
		expect(surface).toMatchObject({ rule: 'input.invalid', severity: 'fail', missing: true });
	});

	it('a wrong value is a fail that is not flagged as missing', () => {
		const f = evaluatePoint({ machine, point: { surface: 'cardboard' as never, mounting: 'stud' } });
		const surface = f.find((x) => x.field === 'point.surface');
		expect(surface?.severity).toBe('fail');
		expect(surface?.missing).toBeUndefined();
	});

	it('a missing machine speed is flagged with its field', () => {
		const f = evaluatePoint({ machine: { ...machine, speedRpm: null as never }, point: { surface: 'machined_housing', mounting: 'stud' } });
		expect(f.find((x) => x.field === 'machine.speedRpm')).toMatchObject({ missing: true, severity: 'fail' });
	});
});
