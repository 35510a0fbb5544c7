// Boards: one live board per machine photo or drawing within a survey. The board's content is a
// Yjs document (board-document.ts; kept live by src/lib/server/collab); this module holds its
// metadata. Changes open live boards must hear of go through src/lib/server/boards/service.ts.
import type { DB } from './index';
import { isSettled } from '../../survey/board-access';
import { readDocument } from './board-document';

const columns = [
	'board.id',
	'board.organisation_id',
	'board.survey_id',
	'board.machine_id',
	'board.media_id',
	'board.title',
	'board.frozen_at',
	'board.created_at',
	'machine.name as machine_name',
	'machine.tag as machine_tag',
	'survey.title as survey_title',
	'survey.status as survey_status',
	'survey.archived_at as survey_archived_at'
] as const;

function base(db: DB) {
	return db
		.selectFrom('board')
		.innerJoin('machine', (j) =>
			j.onRef('machine.id', '=', 'board.machine_id').onRef('machine.organisation_id', '=', 'board.organisation_id')
		)
		.innerJoin('survey', (j) => j.onRef('survey.id', '=', 'board.survey_id').onRef('survey.organisation_id', '=', 'board.organisation_id'))
		.select(columns);
}

export function listForSurvey(db: DB, organisationId: string, surveyId: string) {
	return base(db)
		.where('board.organisation_id', '=', organisationId)
		.where('board.survey_id', '=', surveyId)
		.orderBy('machine.name')
		.orderBy('board.created_at')
		.execute();
}

export function get(db: DB, organisationId: string, id: string) {
	return base(db).where('board.organisation_id', '=', organisationId).where('board.id', '=', id).executeTakeFirst();
}

export class BoardRuleError extends Error {}

/**
 * Creates a board for a machine of the survey, over one of that machine's photos or drawings
 * (or none yet). Null when the survey is not the organisation's.
 */
export async function create(
	db: DB,
	organisationId: string,
	input: { surveyId: string; machineId: string; mediaId?: string | null; title: string }
) {
	return db.transaction().execute(async (trx) => {
		const survey = await trx
			.selectFrom('survey')
			.select(['id', 'status', 'archived_at'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', input.surveyId)
			.executeTakeFirst();
		if (!survey) return null;
		if (isSettled(survey.status) || survey.archived_at)
			throw new BoardRuleError('An approved, closed or archived survey takes no new boards.');
		const inSurvey = await trx
			.selectFrom('survey_machine')
			.select('machine_id')
			.where('organisation_id', '=', organisationId)
			.where('survey_id', '=', input.surveyId)
			.where('machine_id', '=', input.machineId)
			.executeTakeFirst();
		if (!inSurvey) throw new BoardRuleError('Add the machine to the survey first.');
		if (input.mediaId) {
			const media = await trx
				.selectFrom('media')
				.select('id')
				.where('organisation_id', '=', organisationId)
				.where('id', '=', input.mediaId)
				.where('machine_id', '=', input.machineId)
				.executeTakeFirst();
			if (!media) throw new BoardRuleError('The photo or drawing must be one of this machine’s.');
		}
		return trx
			.insertInto('board')
			.values({
				organisation_id: organisationId,
				survey_id: input.surveyId,
				machine_id: input.machineId,
				media_id: input.mediaId ?? null,
				title: input.title
			})
			.returning(['id'])
			.executeTakeFirstOrThrow();
	});
}

export async function rename(db: DB, organisationId: string, id: string, title: string) {
	const r = await db
		.updateTable('board')
		.set({ title })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return Boolean(r);
}

/** Points the board at another photo or drawing of its machine. */
export async function setMedia(db: DB, organisationId: string, id: string, mediaId: string | null) {
	return db.transaction().execute(async (trx) => {
		const b = await trx
			.selectFrom('board')
			.select(['machine_id'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', id)
			.executeTakeFirst();
		if (!b) return false;
		if (mediaId) {
			const m = await trx
				.selectFrom('media')
				.select('id')
				.where('organisation_id', '=', organisationId)
				.where('id', '=', mediaId)
				.where('machine_id', '=', b.machine_id)
				.executeTakeFirst();
			if (!m) throw new BoardRuleError('The photo or drawing must be one of this machine’s.');
		}
		await trx.updateTable('board').set({ media_id: mediaId }).where('id', '=', id).execute();
		return true;
	});
}

/**
 * Freezes one board (read-only from now on). The row lock waits for updates being appended and
 * makes later ones see the freeze. Run it in a transaction that announces the change:
 * `freezeBoard` in src/lib/server/boards/service.ts.
 */
export async function freeze(db: DB, organisationId: string, id: string) {
	const b = await db
		.selectFrom('board')
		.select(['id', 'frozen_at'])
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.forUpdate()
		.executeTakeFirst();
	if (!b) return false;
	if (!b.frozen_at) await db.updateTable('board').set({ frozen_at: new Date() }).where('id', '=', id).execute();
	return true;
}

/** Lifts a freeze (e.g. when a revision is reopened); announce it: `unfreezeBoard` in boards/service.ts. */
export async function unfreeze(db: DB, organisationId: string, id: string) {
	const r = await db
		.updateTable('board')
		.set({ frozen_at: null })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return r !== undefined;
}

/**
 * The board's stored document (snapshot and log merged) as one Yjs update, for reading the
 * content outside the live board (approval, exports). Null when not the organisation's board.
 */
export async function readContent(db: DB, organisationId: string, id: string): Promise<Uint8Array | null> {
	const b = await db.selectFrom('board').select('id').where('organisation_id', '=', organisationId).where('id', '=', id).executeTakeFirst();
	if (!b) return null;
	return readDocument(db, id);
}
