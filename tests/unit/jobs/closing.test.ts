import { describe, expect, test } from 'vitest';
import { checkClose, closeBlockers } from '../../../src/lib/jobs/closing';
import { recordPointSchema } from '../../../src/lib/schemas/job';

const pass = { worst: 'pass' as const, findings: [{ severity: 'pass' as const, message: 'ok' }] };
const fail = { worst: 'fail' as const, findings: [{ severity: 'fail' as const, message: 'Polarity wrong.' }] };

describe('closing a job', () => {
	test('every point recorded and passing: closes without a note', () => {
		expect(checkClose([{ label: 'P1', record: pass }], '')).toEqual({ ok: true, blockers: [] });
	});
	test('a failing or unrecorded point refuses a close without a reason and names the points', () => {
		const points = [
			{ label: 'P1', record: pass },
			{ label: 'P2', record: fail },
			{ label: 'P3', record: null }
		];
		expect(closeBlockers(points)).toEqual([
			{ label: 'P2', why: 'Polarity wrong.' },
			{ label: 'P3', why: 'not recorded yet' }
		]);
		const refused = checkClose(points, '   ');
		expect(refused.ok).toBe(false);
		if (!refused.ok) expect(refused.message).toMatch(/2 points are not done \(P2: Polarity wrong\. · P3: not recorded yet\)/);
		expect(checkClose(points, 'P2 rewired by the electrician').ok).toBe(true);
	});
	test('a warning does not keep a job open', () => {
		expect(
			checkClose([{ label: 'P1', record: { worst: 'warn', findings: [{ severity: 'warn', message: 'Take a photo.' }] } }], '').ok
		).toBe(true);
	});
});

describe('the record schema', () => {
	const base = {
		mounting: 'stud',
		torqueNm: '8',
		supplyV: '23,9',
		polarity: 'ok',
		readyAt: '',
		baselineStartAt: '',
		deviation: '',
		deviationReason: ''
	};
	test('reads form text: decimal commas, blanks as not recorded', () => {
		const r = recordPointSchema.parse(base);
		expect(r).toMatchObject({ torqueNm: 8, supplyV: 23.9, polarity: 'ok', readyAt: null, recordKey: null, photoMediaId: null });
	});
	test('refuses bad values with a message beside the field', () => {
		const r = recordPointSchema.safeParse({ ...base, torqueNm: 'tight', mounting: 'glue', readyAt: 'yesterday' });
		expect(r.success).toBe(false);
		if (!r.success) expect(r.error.issues.map((i) => i.path[0]).sort()).toEqual(['mounting', 'readyAt', 'torqueNm']);
		const noReason = recordPointSchema.safeParse({ ...base, deviation: 'Pad instead of stud' });
		expect(noReason.success).toBe(false);
		if (!noReason.success) expect(noReason.error.issues[0].path).toEqual(['deviationReason']);
	});
});
