import { describe, expect, it } from 'vitest';
import { bodyParts, mentionToken, parseMentions, plainBody } from '../../../src/lib/survey/mentions';
import { awaitsAction, surveyTodo } from '../../../src/lib/survey/todo';

describe('mentions', () => {
	it('finds picked members by id and typed e-mail addresses, once each', () => {
		const body =
			'Hi @[Esme Engineer](u-eng-1), see this. @[Esme](u-eng-1) again; also @teo@brookside.test and mail@example.com (not a mention).';
		expect(parseMentions(body)).toEqual({ userIds: ['u-eng-1'], emails: ['teo@brookside.test'] });
		expect(parseMentions('no mentions here, @ alone, @[broken](')).toEqual({ userIds: [], emails: [] });
	});
	it('inserts a token that parses back, and shows it as a name', () => {
		const token = mentionToken({ id: 'u-1', name: 'Ana [Lead] (Ops)' });
		expect(parseMentions(`x ${token}`).userIds).toEqual(['u-1']);
		expect(plainBody(`Look ${mentionToken({ id: 'u-2', name: 'Teo' })}!`)).toBe('Look @Teo!');
		expect(bodyParts(`a @[Teo](u-2) b`)).toEqual([{ text: 'a ' }, { mention: 'Teo', userId: 'u-2' }, { text: ' b' }]);
	});
});

describe('what is left to do', () => {
	const boards = [
		{
			title: 'Drive side',
			points: 3,
			findings: [
				{ label: 'P2', worst: 'fail' as const },
				{ label: 'P3', worst: 'warn' as const }
			],
			routesWithoutSupply: [{ pointLabel: 'P3' }],
			undecided: [{ label: 'P3', status: 'proposed' }],
			rejected: [{ label: 'P2' }]
		},
		{ title: 'Blank', points: 0, findings: [], routesWithoutSupply: [], undecided: [], rejected: [] }
	];
	it('a technician walking sees the findings, empty boards and routes without supply', () => {
		expect(surveyTodo({ role: 'technician', status: 'walking', archived: false, planLines: [], boards, changesReason: null })).toEqual([
			'Drive side: P2 has a “Fail” finding.',
			'Drive side: P3 has a “Check” finding.',
			'Drive side: the cable route from P3 has no supply.',
			'Blank: no point yet; mark where the sensors go.',
			'Submit for review when these are done (or explain in the note why not).'
		]);
	});
	it('an engineer reviewing sees the points to decide; the technician waits', () => {
		expect(surveyTodo({ role: 'engineer', status: 'submitted', archived: false, planLines: [], boards, changesReason: null })).toEqual([
			'Drive side: decide on P3.',
			'Drive side: P2 is rejected; approving needs a confirmation.',
			'Approve the layout, or request changes with a reason.'
		]);
		expect(surveyTodo({ role: 'technician', status: 'submitted', archived: false, planLines: [], boards, changesReason: null })[0]).toMatch(
			/waiting for the engineer/
		);
		expect(
			surveyTodo({ role: 'technician', status: 'changes_requested', archived: false, planLines: [], boards: [], changesReason: 'Move P2' })
		).toEqual(['Changes requested: Move P2', 'Every board is ready: submit the survey for review.']);
	});
	it('who a survey waits for', () => {
		expect(awaitsAction('changes_requested', 'technician', 'technician')).toMatch(/Changes requested/);
		expect(awaitsAction('submitted', 'technician', 'technician')).toBeNull();
		expect(awaitsAction('submitted', 'engineer', 'engineer')).toMatch(/review/);
		expect(awaitsAction('walking', 'engineer', 'engineer')).toBeNull();
		expect(awaitsAction('submitted', 'viewer', null)).toBeNull();
	});
});
