// Who may open and who may change a board, read fresh from the database each time it is asked.
import type { DB } from '../db/index';
import type { Role } from '../db/types';
import { can } from '../auth/guard';
import { boardAccess } from '../../survey/board-access';
import { isSessionLive } from '../auth/liveness';

export interface BoardViewer {
	userId: string;
	organisationId: string;
	sessionId: string;
	name: string;
	role: Role;
}

export interface BoardAccess {
	boardId: string;
	organisationId: string;
	surveyId: string;
	role: Role;
	readOnly: boolean;
	/** Why the board is read-only for this member, in words for the user; null when writable. */
	reason: string | null;
}

export { REASON_VIEWER, REASON_APPROVED, REASON_ARCHIVED, REASON_SESSION } from '../../survey/board-access';

/**
 * The member's access to a board of their organisation, or null when the board does not exist,
 * belongs to another organisation or the member may not read boards (all answered alike).
 */
export async function loadBoardAccess(db: DB, viewer: BoardViewer, boardId: string): Promise<BoardAccess | null> {
	// The session is asked of auth/ beside the board query (at the same time): the append's own SQL
	// check (persistence.ts) is what holds at the moment of a write.
	const [row, sessionLive] = await Promise.all([
		db
			.selectFrom('board')
			.innerJoin('survey', (j) =>
				j.onRef('survey.id', '=', 'board.survey_id').onRef('survey.organisation_id', '=', 'board.organisation_id')
			)
			.innerJoin('member', (j) => j.onRef('member.organisation_id', '=', 'board.organisation_id').on('member.user_id', '=', viewer.userId))
			.select([
				'board.id',
				'board.organisation_id',
				'board.survey_id',
				'board.frozen_at',
				'survey.status',
				'survey.archived_at',
				'member.role'
			])
			.where('board.id', '=', boardId)
			.where('board.organisation_id', '=', viewer.organisationId)
			.executeTakeFirst(),
		isSessionLive(db, viewer)
	]);
	if (!row || !can(row.role, 'board.read')) return null;
	const { readOnly, reason } = boardAccess({
		role: row.role,
		surveyStatus: row.status,
		frozen: row.frozen_at !== null,
		archived: row.archived_at !== null,
		sessionLive
	});
	return {
		boardId: row.id,
		organisationId: row.organisation_id,
		surveyId: row.survey_id,
		role: row.role,
		readOnly,
		reason
	};
}
