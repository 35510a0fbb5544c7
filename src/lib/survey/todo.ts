// "What is left to do?" on a survey, for the person reading it: the technician sees what to
// finish before submitting, the engineer what to decide, a viewer where things stand.
import type { Role } from '../server/db/types';
import type { SurveyStatus } from './states';

export interface OpenBoard {
	title: string;
	points: number;
	findings: Array<{ label: string; worst: 'warn' | 'fail' }>;
	routesWithoutSupply: Array<{ pointLabel: string }>;
	undecided: Array<{ label: string; status: string }>;
	rejected: Array<{ label: string }>;
}

export interface TodoInput {
	role: Role;
	status: SurveyStatus;
	archived: boolean;
	/** Lines about the plan (machines, people, photos) that apply before and during the walk. */
	planLines: string[];
	boards: OpenBoard[];
	/** The reason given with the last "request changes", if the survey is in that state. */
	changesReason: string | null;
}

const list = (labels: string[]) =>
	labels.length <= 6 ? labels.join(', ') : `${labels.slice(0, 6).join(', ')} and ${labels.length - 6} more`;

function fieldLines(boards: OpenBoard[]): string[] {
	const out: string[] = [];
	for (const b of boards) {
		if (b.points === 0) {
			out.push(`${b.title}: no point yet; mark where the sensors go.`);
			continue;
		}
		const fails = b.findings.filter((f) => f.worst === 'fail').map((f) => f.label);
		const checks = b.findings.filter((f) => f.worst === 'warn').map((f) => f.label);
		if (fails.length) out.push(`${b.title}: ${list(fails)} ${fails.length === 1 ? 'has' : 'have'} a “Fail” finding.`);
		if (checks.length) out.push(`${b.title}: ${list(checks)} ${checks.length === 1 ? 'has' : 'have'} a “Check” finding.`);
		const routes = b.routesWithoutSupply.map((r) => r.pointLabel);
		if (routes.length) out.push(`${b.title}: the cable route from ${list(routes)} has no supply.`);
	}
	return out;
}

function reviewLines(boards: OpenBoard[]): string[] {
	const out: string[] = [];
	for (const b of boards) {
		const undecided = b.undecided.map((p) => p.label);
		if (undecided.length) out.push(`${b.title}: decide on ${list(undecided)}.`);
		const rejected = b.rejected.map((p) => p.label);
		if (rejected.length)
			out.push(`${b.title}: ${list(rejected)} ${rejected.length === 1 ? 'is' : 'are'} rejected; approving needs a confirmation.`);
	}
	return out;
}

export function surveyTodo(i: TodoInput): string[] {
	if (i.archived) return ['This survey is archived; nothing is left to do.'];
	const engineer = i.role === 'engineer' || i.role === 'admin';
	const technician = i.role === 'technician';
	switch (i.status) {
		case 'planned':
			return [...i.planLines, ...(engineer || technician ? ['Start the site walk when the team is on site.'] : [])];
		case 'walking':
		case 'changes_requested': {
			const work = [...i.planLines, ...fieldLines(i.boards)];
			const lines = i.status === 'changes_requested' && i.changesReason ? [`Changes requested: ${i.changesReason}`, ...work] : work;
			if (i.role === 'viewer') return lines.length ? lines : ['The technicians are walking the site.'];
			lines.push(
				work.length
					? 'Submit for review when these are done (or explain in the note why not).'
					: 'Every board is ready: submit the survey for review.'
			);
			return lines;
		}
		case 'submitted':
			if (engineer) {
				const lines = reviewLines(i.boards);
				lines.push('Approve the layout, or request changes with a reason.');
				return lines;
			}
			return ['Submitted for review: waiting for the engineer. The boards are read-only until changes are requested.'];
		case 'approved':
			return engineer
				? ['Approved: issue the installation jobs, or reopen the survey to change the layout.']
				: ['Approved: the layout is settled and read-only.'];
		case 'jobs_issued':
			return ['The installation jobs are issued.'];
		case 'closed':
			return ['Closed: nothing is left to do.'];
	}
}

/** Does the survey wait for this person (assigned to it in `assignedAs`, or by role)? */
export function awaitsAction(status: SurveyStatus, role: Role, assignedAs: 'engineer' | 'technician' | null): string | null {
	if (assignedAs === 'technician' || (assignedAs === null && role === 'technician')) {
		if (status === 'changes_requested') return 'Changes requested: make them and submit again.';
		if (status === 'walking') return 'Site walk: mark the points and submit for review.';
		if (status === 'planned') return 'Planned: start the site walk on the day.';
	}
	if ((assignedAs === 'engineer' || assignedAs === null) && (role === 'engineer' || role === 'admin')) {
		if (status === 'submitted') return 'Submitted: review and approve or request changes.';
		if (status === 'approved') return 'Approved: issue the installation jobs.';
	}
	return null;
}
