// The first-run checklist of an organisation: the first steps of the whole job, each ticked off
// by the data itself (nobody ticks a box by hand). Every count is scoped to the organisation.
import { sql } from 'kysely';
import type { DB } from './db/index';
import type { Role } from './db/types';

export type FirstRunKey = 'team' | 'machine' | 'bearings' | 'photo' | 'survey';

export interface FirstRunStep {
	key: FirstRunKey;
	title: string;
	/** What to do, for a step not done yet. */
	todo: string;
	href: string;
	done: boolean;
	/** Whether this role can do the step (the others see it, but not as theirs). */
	yours: boolean;
	/** Who does the step, in words, for those who cannot. */
	who: string;
}

export interface FirstRun {
	steps: FirstRunStep[];
	done: number;
	/** True once every step is done: the checklist is then not shown any more. */
	complete: boolean;
}

const MAY: Record<FirstRunKey, Role[]> = {
	team: ['admin'],
	machine: ['admin', 'engineer'],
	bearings: ['admin', 'engineer', 'technician'],
	photo: ['admin', 'engineer', 'technician'],
	survey: ['admin', 'engineer']
};

export async function firstRun(db: DB, organisationId: string, role: Role): Promise<FirstRun> {
	const count = (table: 'machine' | 'bearing' | 'media' | 'survey') =>
		db
			.selectFrom(table)
			.select(sql<number>`count(*)::int`.as('n'))
			.where('organisation_id', '=', organisationId)
			.where('archived_at', 'is', null)
			.executeTakeFirstOrThrow()
			.then((r) => r.n);
	const [members, invitations, machines, bearings, media, surveys] = await Promise.all([
		db
			.selectFrom('member')
			.select(sql<number>`count(*)::int`.as('n'))
			.where('organisation_id', '=', organisationId)
			.executeTakeFirstOrThrow()
			.then((r) => r.n),
		db
			.selectFrom('invitation')
			.select(sql<number>`count(*)::int`.as('n'))
			.where('organisation_id', '=', organisationId)
			.where('revoked_at', 'is', null)
			.executeTakeFirstOrThrow()
			.then((r) => r.n),
		count('machine'),
		count('bearing'),
		count('media'),
		count('survey')
	]);
	const steps: Omit<FirstRunStep, 'yours' | 'who'>[] = [
		{
			key: 'team',
			title: 'Invite your team',
			todo: 'Invite the engineer, the technicians and anyone who only reads, each with their role.',
			href: '/settings/members',
			done: members > 1 || invitations > 0
		},
		{
			key: 'machine',
			title: 'Add a machine to the register',
			todo: 'Add a site and the machines to survey, by hand or from a CSV file.',
			href: '/register',
			done: machines > 0
		},
		{
			key: 'bearings',
			title: 'Record the bearings of a machine',
			todo: 'Open a machine and add its drive-end and non-drive-end bearings.',
			href: '/register/machines',
			done: bearings > 0
		},
		{
			key: 'photo',
			title: 'Add a photo or drawing of a machine',
			todo: 'Take a photo with the tablet camera or drop a drawing on the machine page.',
			href: '/register/machines',
			done: media > 0
		},
		{
			key: 'survey',
			title: 'Plan a survey',
			todo: 'Pick the machines to walk, the people and the date.',
			href: '/surveys/new',
			done: surveys > 0
		}
	];
	const who = (roles: Role[]) =>
		roles.length === 1 ? `An ${roles[0]} does this.` : `An ${roles.slice(0, -1).join(', ')} or ${roles.at(-1)} does this.`;
	const withRole = steps.map((s) => ({ ...s, yours: MAY[s.key].includes(role), who: who(MAY[s.key]) }));
	const done = withRole.filter((s) => s.done).length;
	return { steps: withRole, done, complete: done === withRole.length };
}
