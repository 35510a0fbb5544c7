// Moving a survey through review: the one write path for a survey's status. Each move is
// checked against the transition table (src/lib/survey/states.ts) and the guard, made under a
// lock on the survey and its boards, kept as a survey_transition row (who, when, from, to, note),
// and announced to the live board when the transaction commits.
import type { Transaction } from 'kysely';
import type { DB } from '../db/index';
import type { Database } from '../db/types';
import type { Role } from '../db/types';
import { can } from '../auth/guard';
import { announceBoardState } from '../boards/service';
import { record } from '../db/audit';
import { checkTransition, SURVEY_STATUS_LABEL, TRANSITION_NOTE_MAX, type SurveyStatus, type TransitionName } from '../../survey/states';
import { RevisionContentError, writeRevision, type RevisionExceptionsNeeded } from './revisions';

export class WorkflowError extends Error {
	constructor(
		readonly status: 400 | 403 | 404 | 409,
		message: string,
		/** Points to confirm before approving (409 with `exceptions`). */
		readonly exceptions?: RevisionExceptionsNeeded['exceptions']
	) {
		super(message);
	}
}

export interface TransitionInput {
	organisationId: string;
	surveyId: string;
	name: TransitionName;
	actor: { userId: string; role: Role };
	note?: string;
	/** Approving with rejected or undecided points needs this set; it is recorded. */
	confirmExceptions?: boolean;
}

export interface TransitionResult {
	id: string;
	from: SurveyStatus;
	to: SurveyStatus;
	transitionId: string;
	revision: { id: string; number: number } | null;
}

/**
 * Makes one move. Throws WorkflowError: 403 when the role may not, 404 when the survey is not
 * the organisation's, 409 from a state where the move makes no sense (or when approval needs
 * the exceptions confirmed), 400 when a required note is missing.
 */
export async function transitionSurvey(db: DB, input: TransitionInput): Promise<TransitionResult> {
	return db.transaction().execute((trx) => transitionSurveyIn(trx, input, { generic: true }));
}

/**
 * The move inside the caller's transaction (issuing jobs writes the jobs and the move together).
 * Same checks and errors as transitionSurvey.
 */
export async function transitionSurveyIn(
	trx: Transaction<Database>,
	input: TransitionInput,
	opts: { generic?: boolean } = {}
): Promise<TransitionResult> {
	const note = (input.note ?? '').trim();
	if (note.length > TRANSITION_NOTE_MAX) throw new WorkflowError(400, `A note has at most ${TRANSITION_NOTE_MAX} characters.`);
	{
		const s = await trx
			.selectFrom('survey')
			.select(['id', 'status', 'archived_at'])
			.where('organisation_id', '=', input.organisationId)
			.where('id', '=', input.surveyId)
			.forUpdate()
			.executeTakeFirst();
		if (!s) throw new WorkflowError(404, 'No such survey in your organisation.');
		const check = checkTransition(input.name, { role: input.actor.role, status: s.status, archived: s.archived_at !== null, note });
		if (!check.ok) throw new WorkflowError(check.status, check.message);
		const t = check.transition;
		// The guard is the authority on roles; the shared table is its copy for the browser.
		if (!can(input.actor.role, t.action)) throw new WorkflowError(403, `Your role cannot ${t.label.toLowerCase()}.`);
		if (opts.generic && t.name === 'issue_jobs') {
			// Issuing needs the jobs themselves (points, assignees, dates): jobs/service.ts issueJobs,
			// so a survey never reads "jobs issued" without its jobs.
			throw new WorkflowError(409, "Jobs are issued from the survey's “Issue jobs” page, with their points, assignees and dates.");
		}

		// Lock the boards (FOR UPDATE waits for updates being appended right now), so nothing
		// lands on a board after the move that should have stopped it.
		const boards = await trx
			.selectFrom('board')
			.select('id')
			.where('organisation_id', '=', input.organisationId)
			.where('survey_id', '=', s.id)
			.orderBy('id')
			.forUpdate()
			.execute();
		const now = new Date();
		let revision: TransitionResult['revision'] = null;
		if (t.to === 'approved') {
			const written = await writeRevision(trx, {
				organisationId: input.organisationId,
				surveyId: s.id,
				approvedBy: input.actor.userId,
				approvedAt: now,
				note,
				confirmExceptions: input.confirmExceptions === true
			}).catch((e) => {
				if (e instanceof RevisionContentError) throw new WorkflowError(409, e.message);
				throw e;
			});
			if (!written.ok) {
				throw new WorkflowError(
					409,
					`${written.exceptions.length} point${written.exceptions.length === 1 ? ' is' : 's are'} rejected or undecided. Confirm to approve the layout with ${written.exceptions.length === 1 ? 'it' : 'them'}.`,
					written.exceptions
				);
			}
			revision = written.revision;
			await trx.updateTable('board').set({ frozen_at: now }).where('survey_id', '=', s.id).where('frozen_at', 'is', null).execute();
		}
		if (input.name === 'reopen') {
			await trx.updateTable('board').set({ frozen_at: null }).where('survey_id', '=', s.id).execute();
		}
		await trx
			.updateTable('survey')
			.set({
				status: t.to,
				updated_at: now,
				...(t.to === 'approved' ? { approved_at: now, approved_by: input.actor.userId } : {}),
				...(input.name === 'reopen' ? { approved_at: null, approved_by: null } : {})
			})
			.where('id', '=', s.id)
			.execute();
		const row = await trx
			.insertInto('survey_transition')
			.values({
				organisation_id: input.organisationId,
				survey_id: s.id,
				transition: t.name,
				from_status: s.status,
				to_status: t.to,
				actor_user_id: input.actor.userId,
				actor_role: input.actor.role,
				note,
				created_at: now
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await announceBoardState(
			trx,
			boards.map((b) => b.id)
		);
		return { id: s.id, from: s.status, to: t.to, transitionId: row.id, revision };
	}
}

/** The moves made on a survey, oldest first, with who made them. */
export function listTransitions(db: DB, organisationId: string, surveyId: string) {
	return db
		.selectFrom('survey_transition')
		.leftJoin('app_user', 'app_user.id', 'survey_transition.actor_user_id')
		.select([
			'survey_transition.id',
			'survey_transition.transition',
			'survey_transition.from_status',
			'survey_transition.to_status',
			'survey_transition.actor_user_id',
			'survey_transition.actor_role',
			'survey_transition.note',
			'survey_transition.created_at',
			'app_user.name as actor_name'
		])
		.where('survey_transition.organisation_id', '=', organisationId)
		.where('survey_transition.survey_id', '=', surveyId)
		.orderBy('survey_transition.id')
		.execute();
}

/** Archives a survey: it keeps its status, and its boards turn read-only for everyone. */
export async function archiveSurvey(db: DB, organisationId: string, surveyId: string, actor: { userId: string; role: Role }) {
	if (!can(actor.role, 'survey.archive')) throw new WorkflowError(403, 'Your role cannot archive surveys.');
	return db.transaction().execute(async (trx) => {
		const r = await trx
			.updateTable('survey')
			.set({ archived_at: new Date(), updated_at: new Date() })
			.where('organisation_id', '=', organisationId)
			.where('id', '=', surveyId)
			.where('archived_at', 'is', null)
			.returning(['id', 'status'])
			.executeTakeFirst();
		if (!r) return false;
		const boards = await trx.selectFrom('board').select('id').where('survey_id', '=', surveyId).forUpdate().execute();
		await record(trx, {
			organisationId,
			actorUserId: actor.userId,
			action: 'survey.archived',
			subjectType: 'survey',
			subjectId: surveyId,
			data: { status: r.status, statusLabel: SURVEY_STATUS_LABEL[r.status] }
		});
		await announceBoardState(
			trx,
			boards.map((b) => b.id)
		);
		return true;
	});
}
