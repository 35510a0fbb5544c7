import { describe, expect, test } from 'vitest';
import { DEFAULT_THRESHOLDS, evaluateInstalled, installationChecklist, SAFETY_CAUTIONS } from '../../../src/lib/trade';

describe('evaluateInstalled', () => {
	test('a complete, good record passes', () => {
		const r = evaluateInstalled({ mounting: 'stud', torqueNm: 8, supplyV: 23.6, polarityOk: true });
		expect(r.worst).toBe('pass');
		expect(r.findings.map((f) => f.rule).sort()).toEqual(['install.polarity', 'install.supply-voltage', 'mounting.stud-torque']);
	});
	test('torque above the 10 N·m default limit fails (common practice)', () => {
		const r = evaluateInstalled({ mounting: 'stud', torqueNm: 12, supplyV: 24, polarityOk: true });
		expect(r.findings.find((f) => f.rule === 'mounting.stud-torque')).toMatchObject({ severity: 'fail', value: 12, limit: 10 });
	});
	test('10 N·m is within the limit', () => {
		expect(evaluateInstalled({ mounting: 'stud', torqueNm: 10, supplyV: 24, polarityOk: true }).worst).toBe('pass');
	});
	test('supply outside 20.4–28.8 V fails (IEC 61131-2, percentages from memory)', () => {
		expect(evaluateInstalled({ mounting: 'bonded_pad', torqueNm: 5, supplyV: 20.3, polarityOk: true }).worst).toBe('fail');
		expect(evaluateInstalled({ mounting: 'bonded_pad', torqueNm: 5, supplyV: 28.9, polarityOk: true }).worst).toBe('fail');
		expect(evaluateInstalled({ mounting: 'bonded_pad', torqueNm: 5, supplyV: 20.4, polarityOk: true }).worst).toBe('pass');
	});
	test('wrong polarity fails; nothing recorded warns', () => {
		expect(evaluateInstalled({ mounting: 'stud', torqueNm: 8, supplyV: 24, polarityOk: false }).worst).toBe('fail');
		const r = evaluateInstalled({ mounting: 'stud' });
		expect(r.worst).toBe('warn');
		expect(r.findings.every((f) => f.severity === 'warn')).toBe(true);
	});
	test('bad values are a fail, never a crash', () => {
		expect(evaluateInstalled({ mounting: 'stud', torqueNm: Number.NaN, supplyV: 24, polarityOk: true }).worst).toBe('fail');
		expect(evaluateInstalled(null as never).worst).toBe('fail');
	});
});

describe('installationChecklist', () => {
	test('every checklist starts with lockout and includes the electrical safety steps', () => {
		for (const m of ['stud', 'bonded_pad', 'magnet'] as const) {
			const ids = installationChecklist(m).map((s) => s.id);
			expect(ids[0]).toBe('lockout');
			expect(ids).toContain('supply-off');
			expect(ids).toContain('measure-supply');
			expect(ids).toContain('fix-cable');
			expect(ids).toContain('couplant');
		}
	});
	test('stud steps carry the hole depths; aluminium needs deeper ones', () => {
		const drill = (material?: 'aluminium') => installationChecklist('stud', { material }).find((s) => s.id === 'drill-tap')!.text;
		expect(drill()).toMatch(/15 mm deep/);
		expect(drill()).toMatch(/9 mm of full thread/);
		expect(drill('aluminium')).toMatch(/18 mm deep/);
		expect(drill('aluminium')).toMatch(/12 mm of full thread/);
	});
	test('pad steps carry the cure time from the thresholds', () => {
		expect(installationChecklist('bonded_pad').find((s) => s.id === 'cure')!.text).toMatch(/15 min/);
		const steps = installationChecklist('bonded_pad', { thresholds: { ...DEFAULT_THRESHOLDS, padCureMin: 30 } });
		expect(steps.find((s) => s.id === 'cure')!.text).toMatch(/30 min/);
	});
	test('a hazardous area adds the permit step first', () => {
		const steps = installationChecklist('stud', { hazardousArea: true });
		expect(steps[0]).toMatchObject({ id: 'permit', safety: true });
	});
	test('the cautions defer to local codes', () => {
		expect(SAFETY_CAUTIONS.some((c) => /local codes/.test(c.text))).toBe(true);
	});
});

describe('evaluateInstalled on a job record (plan, commissioning times, photo)', () => {
	const job = {
		mounting: 'stud' as const,
		torqueNm: 8,
		supplyV: 24,
		polarityOk: true,
		plannedMounting: 'stud' as const,
		readyAt: '2026-12-07T09:00:00Z',
		baselineStartAt: '2026-12-07T09:05:00Z',
		deviation: '',
		deviationReason: '',
		photo: true
	};
	test('a complete record as planned passes every check', () => {
		const r = evaluateInstalled(job);
		expect(r.worst).toBe('pass');
		expect(r.findings.map((f) => f.rule).sort()).toEqual([
			'install.baseline',
			'install.photo',
			'install.polarity',
			'install.ready',
			'install.supply-voltage',
			'mounting.stud-torque'
		]);
	});
	test('another method than planned fails until the reason is given, then warns', () => {
		const changed = evaluateInstalled({ ...job, mounting: 'bonded_pad' });
		expect(changed.findings.find((f) => f.rule === 'install.deviation')).toMatchObject({ severity: 'fail' });
		const explained = evaluateInstalled({ ...job, mounting: 'bonded_pad', deviationReason: 'Wall too thin at the seat' });
		expect(explained.findings.find((f) => f.rule === 'install.deviation')!.severity).toBe('warn');
	});
	test('a baseline started before the device was ready fails; missing times and photo warn', () => {
		expect(
			evaluateInstalled({ ...job, baselineStartAt: '2026-12-07T08:59:00Z' }).findings.find((f) => f.rule === 'install.baseline')!.severity
		).toBe('fail');
		const missing = evaluateInstalled({ ...job, readyAt: null, baselineStartAt: null, photo: false });
		expect(missing.worst).toBe('warn');
		expect(
			missing.findings
				.filter((f) => f.severity === 'warn')
				.map((f) => f.rule)
				.sort()
		).toEqual(['install.baseline', 'install.photo', 'install.ready']);
	});
	test('19.8 V is outside 20.4–28.8 V (IEC 61131-2, percentages from memory)', () => {
		expect(evaluateInstalled({ ...job, supplyV: 19.8 }).findings.find((f) => f.rule === 'install.supply-voltage')!.severity).toBe('fail');
	});
});
