// The one answer to "may this person change this board now?", used by the socket join
// (collab/access.ts), the append statement (collab/persistence.ts, through writablePairs) and
// the board page. Pure, so the browser can say the same thing.
import type { Role } from '../server/db/types';
import { SETTLED_STATUSES, SURVEY_STATUSES, type SurveyStatus } from './states';

export const REASON_VIEWER = 'Your role can read this board but not change it.';
export const REASON_APPROVED = 'This layout has been approved; the board is read-only.';
export const REASON_JOBS = 'The installation jobs for this layout have been issued; the board is read-only.';
export const REASON_CLOSED = 'This survey is closed; the board is read-only.';
export const REASON_FROZEN = 'This board is frozen; it is read-only.';
export const REASON_ARCHIVED = 'This survey is archived; the board is read-only.';
export const REASON_SUBMITTED =
	'The survey is submitted for review; the board is read-only for technicians until the engineer requests changes.';
export const REASON_SESSION = 'Your session has ended. Sign in again to keep editing.';

/** Roles that may write boards at all (the guard's 'board.write'). */
const WRITERS: readonly Role[] = ['admin', 'engineer', 'technician'];
/** Roles that decide on points (the guard's 'review.decide'): they keep writing during review. */
const REVIEWERS: readonly Role[] = ['admin', 'engineer'];
const ROLES: readonly Role[] = ['admin', 'engineer', 'technician', 'viewer'];

export interface BoardAccessInput {
	role: Role;
	surveyStatus: SurveyStatus;
	/** The board's frozen_at is set. */
	frozen: boolean;
	/** The survey's archived_at is set. */
	archived: boolean;
	sessionLive: boolean;
}

export interface BoardAccessDecision {
	readOnly: boolean;
	/** Why, in words for the person; null when they may write. */
	reason: string | null;
}

export function boardAccess(i: BoardAccessInput): BoardAccessDecision {
	const reason = !i.sessionLive
		? REASON_SESSION
		: !WRITERS.includes(i.role)
			? REASON_VIEWER
			: i.archived
				? REASON_ARCHIVED
				: i.surveyStatus === 'approved'
					? REASON_APPROVED
					: i.surveyStatus === 'jobs_issued'
						? REASON_JOBS
						: i.surveyStatus === 'closed'
							? REASON_CLOSED
							: i.frozen
								? REASON_FROZEN
								: i.surveyStatus === 'submitted' && !REVIEWERS.includes(i.role)
									? REASON_SUBMITTED
									: null;
	return { readOnly: reason !== null, reason };
}

/**
 * Every 'role:status' pair that may write to a board that is neither frozen nor archived, with
 * a live session: what the append statement checks against the member's role and the survey's
 * status at the moment it stores an update.
 */
export function writablePairs(): string[] {
	const out: string[] = [];
	for (const role of ROLES) {
		for (const surveyStatus of SURVEY_STATUSES) {
			if (!boardAccess({ role, surveyStatus, frozen: false, archived: false, sessionLive: true }).readOnly)
				out.push(`${role}:${surveyStatus}`);
		}
	}
	return out;
}

/** A settled survey's boards are read-only for everyone (approved, jobs issued, closed). */
export function isSettled(status: SurveyStatus): boolean {
	return SETTLED_STATUSES.includes(status);
}
