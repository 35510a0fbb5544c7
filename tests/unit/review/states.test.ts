// The survey transition table and the board-access policy, written out by hand so a change that
// disagrees with the issue (review and approval) fails here.
import { describe, expect, it } from 'vitest';
import { can, PERMISSIONS, ROLES } from '../../../src/lib/server/auth/guard';
import type { Role } from '../../../src/lib/server/db/types';
import {
	availableTransitions,
	checkTransition,
	SURVEY_STATUSES,
	TRANSITION_NAMES,
	TRANSITION_ROLES,
	TRANSITIONS,
	type SurveyStatus,
	type TransitionName
} from '../../../src/lib/survey/states';
import {
	boardAccess,
	REASON_APPROVED,
	REASON_ARCHIVED,
	REASON_CLOSED,
	REASON_FROZEN,
	REASON_JOBS,
	REASON_SESSION,
	REASON_SUBMITTED,
	REASON_VIEWER,
	writablePairs
} from '../../../src/lib/survey/board-access';

// Which transition is possible from which status, and for whom (A E T V).
const EXPECTED: Record<TransitionName, { from: SurveyStatus[]; to: SurveyStatus; roles: string }> = {
	start: { from: ['planned'], to: 'walking', roles: 'AET' },
	replan: { from: ['walking'], to: 'planned', roles: 'AE' },
	submit: { from: ['walking', 'changes_requested'], to: 'submitted', roles: 'AET' },
	request_changes: { from: ['submitted'], to: 'changes_requested', roles: 'AE' },
	approve: { from: ['submitted'], to: 'approved', roles: 'AE' },
	reopen: { from: ['approved'], to: 'walking', roles: 'AE' },
	issue_jobs: { from: ['approved'], to: 'jobs_issued', roles: 'AE' },
	close: { from: ['jobs_issued'], to: 'closed', roles: 'AE' }
};
const LETTER: Record<Role, string> = { admin: 'A', engineer: 'E', technician: 'T', viewer: 'V' };

describe('survey transitions', () => {
	it('the shared role table is the guard’s', () => {
		for (const [action, roles] of Object.entries(TRANSITION_ROLES)) {
			expect([...roles].sort(), action).toEqual([...(PERMISSIONS[action as keyof typeof PERMISSIONS] as readonly Role[])].sort());
		}
	});

	for (const name of TRANSITION_NAMES) {
		for (const role of ROLES) {
			for (const status of SURVEY_STATUSES) {
				const e = EXPECTED[name];
				const roleOk = e.roles.includes(LETTER[role]);
				const stateOk = e.from.includes(status);
				const expected = !roleOk ? 403 : !stateOk ? 409 : 'ok';
				it(`${name} by ${role} from ${status}: ${expected}`, () => {
					const r = checkTransition(name, { role, status, archived: false, note: 'because' });
					if (expected === 'ok') {
						expect(r).toMatchObject({ ok: true, transition: { to: e.to } });
						expect(can(role, TRANSITIONS[name].action)).toBe(true);
					} else expect(r).toMatchObject({ ok: false, status: expected });
				});
			}
		}
	}

	it('an archived survey does not move; a required note is required', () => {
		expect(checkTransition('submit', { role: 'technician', status: 'walking', archived: true })).toMatchObject({ ok: false, status: 409 });
		expect(checkTransition('request_changes', { role: 'engineer', status: 'submitted', archived: false, note: '  ' })).toMatchObject({
			ok: false,
			status: 400,
			message: 'Say what needs changing.'
		});
		expect(checkTransition('reopen', { role: 'engineer', status: 'approved', archived: false })).toMatchObject({ ok: false, status: 400 });
		expect(checkTransition('submit', { role: 'technician', status: 'walking', archived: false })).toMatchObject({ ok: true });
		expect(checkTransition('approve', { role: null, status: 'submitted', archived: false })).toMatchObject({ ok: false, status: 403 });
	});

	it('lists the buttons a role has in a status', () => {
		expect(availableTransitions('technician', 'walking', false).map((t) => t.name)).toEqual(['submit']);
		expect(availableTransitions('engineer', 'submitted', false).map((t) => t.name)).toEqual(['request_changes', 'approve']);
		expect(availableTransitions('engineer', 'approved', false).map((t) => t.name)).toEqual(['reopen', 'issue_jobs']);
		expect(availableTransitions('viewer', 'submitted', false)).toEqual([]);
		expect(availableTransitions('engineer', 'submitted', true)).toEqual([]);
	});
});

describe('board access policy', () => {
	// Writable (W) or the reason, for every role × status on a board neither frozen nor archived.
	const W = null;
	const MATRIX: Record<SurveyStatus, Record<Role, string | null>> = {
		planned: { admin: W, engineer: W, technician: W, viewer: REASON_VIEWER },
		walking: { admin: W, engineer: W, technician: W, viewer: REASON_VIEWER },
		submitted: { admin: W, engineer: W, technician: REASON_SUBMITTED, viewer: REASON_VIEWER },
		changes_requested: { admin: W, engineer: W, technician: W, viewer: REASON_VIEWER },
		approved: { admin: REASON_APPROVED, engineer: REASON_APPROVED, technician: REASON_APPROVED, viewer: REASON_VIEWER },
		jobs_issued: { admin: REASON_JOBS, engineer: REASON_JOBS, technician: REASON_JOBS, viewer: REASON_VIEWER },
		closed: { admin: REASON_CLOSED, engineer: REASON_CLOSED, technician: REASON_CLOSED, viewer: REASON_VIEWER }
	};
	for (const status of SURVEY_STATUSES) {
		for (const role of ROLES) {
			for (const frozen of [false, true]) {
				for (const archived of [false, true]) {
					for (const sessionLive of [true, false]) {
						const expected = !sessionLive
							? REASON_SESSION
							: role === 'viewer'
								? REASON_VIEWER
								: archived
									? REASON_ARCHIVED
									: MATRIX[status][role] !== null && MATRIX[status][role] !== REASON_SUBMITTED
										? MATRIX[status][role]
										: frozen
											? REASON_FROZEN
											: MATRIX[status][role];
						it(`${role} on a ${status} survey${frozen ? ', frozen' : ''}${archived ? ', archived' : ''}${sessionLive ? '' : ', session ended'}`, () => {
							expect(boardAccess({ role, surveyStatus: status, frozen, archived, sessionLive })).toEqual({
								readOnly: expected !== null,
								reason: expected
							});
						});
					}
				}
			}
		}
	}

	it('the append statement’s pairs are exactly the writable cells', () => {
		const expected = SURVEY_STATUSES.flatMap((s) => ROLES.filter((r) => MATRIX[s][r] === null).map((r) => `${r}:${s}`));
		expect(writablePairs().sort()).toEqual(expected.sort());
		expect(writablePairs()).toContain('engineer:submitted');
		expect(writablePairs()).not.toContain('technician:submitted');
	});
});
