import { describe, expect, it } from 'vitest';
import { ACTIONS, can, isRole, ROLES } from '../../../src/lib/server/auth/guard';

// The role matrix written out by hand from PRODUCT.md "People and roles", so that a change to the
// guard that disagrees with the product brief fails here. A = admin, E = engineer, T = technician, V = viewer.
const EXPECTED: Record<string, string> = {
	'organisation.read': 'AETV',
	'organisation.manage': 'A',
	'member.read': 'AETV',
	'member.invite': 'A',
	'member.change-role': 'A',
	'member.remove': 'A',
	'mail.outbox.read': 'A',
	'thresholds.read': 'AETV',
	'thresholds.edit': 'AE',
	'register.read': 'AETV',
	'register.write': 'AE',
	'register.field-edit': 'AET',
	'media.upload': 'AET',
	'survey.read': 'AETV',
	'survey.plan': 'AE',
	'survey.start': 'AET',
	'survey.submit': 'AET',
	'survey.review': 'AE',
	'survey.reopen': 'AE',
	'survey.close': 'AE',
	'survey.archive': 'AE',
	'board.read': 'AETV',
	'board.write': 'AET',
	'review.decide': 'AE',
	'comment.write': 'AETV',
	'job.read': 'AETV',
	'job.issue': 'AE',
	'job.record': 'AET',
	'job.close': 'AE',
	'audit.read': 'AE',
	'integration.manage': 'A'
};
const LETTER = { admin: 'A', engineer: 'E', technician: 'T', viewer: 'V' } as const;

describe('guard role matrix', () => {
	it('every guarded action has an expected row (new actions need a decision here)', () => {
		expect(ACTIONS.slice().sort()).toEqual(Object.keys(EXPECTED).sort());
	});

	for (const action of Object.keys(EXPECTED)) {
		for (const role of ROLES) {
			const allowed = EXPECTED[action].includes(LETTER[role]);
			it(`${role} ${allowed ? 'may' : 'may not'} ${action}`, () => {
				expect(can(role, action as (typeof ACTIONS)[number])).toBe(allowed);
			});
		}
	}

	it('no role means no permission, and unknown roles are not roles', () => {
		expect(can(null, 'organisation.read')).toBe(false);
		expect(can(undefined, 'board.read')).toBe(false);
		expect(isRole('owner')).toBe(false);
		expect(isRole('viewer')).toBe(true);
	});

	it('a viewer changes nothing', () => {
		const writes = ACTIONS.filter((a) => !/\.read$/.test(a) && a !== 'comment.write');
		expect(writes.filter((a) => can('viewer', a))).toEqual([]);
	});
});
