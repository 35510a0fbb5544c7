// The life of a survey, shared by the browser (which buttons to show) and the server (which
// moves to allow). Pure: no I/O. The server asks the guard for the transition's action and
// refuses a move from any other state with 409.
//
// planned → walking → submitted ⇄ changes_requested → approved → jobs_issued → closed
// Reopening an approved survey goes back to walking and starts the next revision.
// Archiving is separate (archived_at): an archived survey keeps its status and changes nothing.
import type { Role } from '../server/db/types';

export const SURVEY_STATUSES = ['planned', 'walking', 'submitted', 'changes_requested', 'approved', 'jobs_issued', 'closed'] as const;
export type SurveyStatus = (typeof SURVEY_STATUSES)[number];

export const SURVEY_STATUS_LABEL: Record<SurveyStatus, string> = {
	planned: 'Planned',
	walking: 'Site walk',
	submitted: 'Submitted for review',
	changes_requested: 'Changes requested',
	approved: 'Approved',
	jobs_issued: 'Jobs issued',
	closed: 'Closed'
};

export const SURVEY_STATUS_TONE: Record<SurveyStatus, 'ok' | 'caution' | 'brand' | 'neutral' | 'stop'> = {
	planned: 'neutral',
	walking: 'brand',
	submitted: 'caution',
	changes_requested: 'stop',
	approved: 'ok',
	jobs_issued: 'ok',
	closed: 'neutral'
};

/** Statuses whose layout is settled: every board is read-only for everyone. */
export const SETTLED_STATUSES: readonly SurveyStatus[] = ['approved', 'jobs_issued', 'closed'];

export function isSurveyStatus(v: unknown): v is SurveyStatus {
	return typeof v === 'string' && (SURVEY_STATUSES as readonly string[]).includes(v);
}

/** Guard actions that move a survey (names as in src/lib/server/auth/guard.ts PERMISSIONS). */
export type TransitionAction =
	'survey.start' | 'survey.plan' | 'survey.submit' | 'survey.review' | 'survey.reopen' | 'job.issue' | 'survey.close';

export const TRANSITION_NAMES = ['start', 'replan', 'submit', 'request_changes', 'approve', 'reopen', 'issue_jobs', 'close'] as const;
export type TransitionName = (typeof TRANSITION_NAMES)[number];

export interface Transition {
	name: TransitionName;
	from: readonly SurveyStatus[];
	to: SurveyStatus;
	/** The guard action the actor's role needs. */
	action: TransitionAction;
	/** 'required': refused without a note (a reason for changes, a reason to reopen). */
	note: 'none' | 'optional' | 'required';
	/** Button text and the past tense for the history. */
	label: string;
	done: string;
}

export const TRANSITIONS: Record<TransitionName, Transition> = {
	start: {
		name: 'start',
		from: ['planned'],
		to: 'walking',
		action: 'survey.start',
		note: 'none',
		label: 'Start the site walk',
		done: 'started the site walk'
	},
	replan: {
		name: 'replan',
		from: ['walking'],
		to: 'planned',
		action: 'survey.plan',
		note: 'optional',
		label: 'Back to planning',
		done: 'moved it back to planning'
	},
	submit: {
		name: 'submit',
		from: ['walking', 'changes_requested'],
		to: 'submitted',
		action: 'survey.submit',
		note: 'optional',
		label: 'Submit for review',
		done: 'submitted it for review'
	},
	request_changes: {
		name: 'request_changes',
		from: ['submitted'],
		to: 'changes_requested',
		action: 'survey.review',
		note: 'required',
		label: 'Request changes',
		done: 'requested changes'
	},
	approve: {
		name: 'approve',
		from: ['submitted'],
		to: 'approved',
		action: 'survey.review',
		note: 'optional',
		label: 'Approve the layout',
		done: 'approved the layout'
	},
	reopen: {
		name: 'reopen',
		from: ['approved'],
		to: 'walking',
		action: 'survey.reopen',
		note: 'required',
		label: 'Reopen for changes',
		done: 'reopened it'
	},
	issue_jobs: {
		name: 'issue_jobs',
		from: ['approved'],
		to: 'jobs_issued',
		action: 'job.issue',
		note: 'optional',
		label: 'Issue the jobs',
		done: 'issued the jobs'
	},
	close: {
		name: 'close',
		from: ['jobs_issued'],
		to: 'closed',
		action: 'survey.close',
		note: 'optional',
		label: 'Close the survey',
		done: 'closed it'
	}
};

export function isTransitionName(v: unknown): v is TransitionName {
	return typeof v === 'string' && (TRANSITION_NAMES as readonly string[]).includes(v);
}

/** Which roles may take each guard action: a copy of the guard's rows, checked by a unit test. */
export const TRANSITION_ROLES: Record<TransitionAction, readonly Role[]> = {
	'survey.start': ['admin', 'engineer', 'technician'],
	'survey.plan': ['admin', 'engineer'],
	'survey.submit': ['admin', 'engineer', 'technician'],
	'survey.review': ['admin', 'engineer'],
	'survey.reopen': ['admin', 'engineer'],
	'job.issue': ['admin', 'engineer'],
	'survey.close': ['admin', 'engineer']
};

export type TransitionCheck = { ok: true; transition: Transition } | { ok: false; status: 403 | 409 | 400; message: string };

/**
 * May `role` take transition `name` on a survey that is `status` (and archived or not)?
 * The answer the server gives, and the one the page uses to show buttons.
 */
export function checkTransition(
	name: TransitionName,
	ctx: { role: Role | null | undefined; status: SurveyStatus; archived: boolean; note?: string }
): TransitionCheck {
	const t = TRANSITIONS[name];
	if (!ctx.role || !TRANSITION_ROLES[t.action].includes(ctx.role)) {
		return { ok: false, status: 403, message: `Your role cannot ${t.label.toLowerCase()}.` };
	}
	if (ctx.archived) return { ok: false, status: 409, message: 'This survey is archived; it cannot change status.' };
	if (!t.from.includes(ctx.status)) {
		const from = t.from.map((s) => SURVEY_STATUS_LABEL[s].toLowerCase()).join(' or ');
		return {
			ok: false,
			status: 409,
			message: `The survey is ${SURVEY_STATUS_LABEL[ctx.status].toLowerCase()}: “${t.label}” is only possible when it is ${from}.`
		};
	}
	if (t.note === 'required' && !(ctx.note ?? '').trim()) {
		return { ok: false, status: 400, message: name === 'request_changes' ? 'Say what needs changing.' : 'Give a reason.' };
	}
	return { ok: true, transition: t };
}

/** The transitions `role` may take from `status` now (for buttons). */
export function availableTransitions(role: Role | null | undefined, status: SurveyStatus, archived: boolean): Transition[] {
	return TRANSITION_NAMES.filter((n) => checkTransition(n, { role, status, archived, note: 'x' }).ok).map((n) => TRANSITIONS[n]);
}

/** Notes on transitions are kept to this many characters. */
export const TRANSITION_NOTE_MAX = 2000;
