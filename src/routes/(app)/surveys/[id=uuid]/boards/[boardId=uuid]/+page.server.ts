import { error } from '@sveltejs/kit';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { boardAccess, isSettled } from '$lib/survey/board-access';
import { context } from '$lib/server/context';
import * as boards from '$lib/server/db/boards';
import { getMachine } from '$lib/server/db/machines';
import { getMedia } from '$lib/server/db/media';
import { listSupplyPoints } from '$lib/server/db/register';
import { getThresholds } from '$lib/server/db/thresholds';
import type { BoardContext } from '$lib/board/types';
import { mentionableMembers } from '$lib/server/review/comments';
import { revisionNumbers, revisionPointsOfBoard } from '$lib/server/review/revisions';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const viewer = requirePage(locals, 'board.read', url);
	const db = context().handle.db;
	const board = await boards.get(db, viewer.organisationId, params.boardId);
	if (!board || board.survey_id !== params.id) error(404, 'No such board in your organisation.');
	const machine = await getMachine(db, viewer.organisationId, board.machine_id);
	if (!machine) error(404, 'The machine of this board is not in your organisation.');
	// ?compare=N draws revision N's points over the board (before and after).
	const compareRaw = url.searchParams.get('compare');
	const compareNumber = compareRaw && /^[1-9]\d{0,5}$/.test(compareRaw) ? Number(compareRaw) : null;
	const [media, supply, thresholds, members, revisions, comparePoints] = await Promise.all([
		board.media_id ? getMedia(db, viewer.organisationId, board.media_id) : Promise.resolve(null),
		// The 24 V DC supplies of the machine's area, or of its site when it has no area.
		listSupplyPoints(db, viewer.organisationId, machine.areaId ? { areaId: machine.areaId } : { siteId: machine.siteId }),
		getThresholds(db, viewer.organisationId),
		mentionableMembers(db, viewer.organisationId),
		revisionNumbers(db, viewer.organisationId, board.survey_id),
		compareNumber ? revisionPointsOfBoard(db, viewer.organisationId, board.survey_id, board.id, compareNumber) : Promise.resolve(null)
	]);
	// The session is live: hooks signed this request in.
	const access = boardAccess({
		role: viewer.role,
		surveyStatus: board.survey_status,
		frozen: board.frozen_at !== null,
		archived: board.survey_archived_at !== null,
		sessionLive: true
	});
	const frozen = board.frozen_at !== null || isSettled(board.survey_status) || board.survey_archived_at !== null;
	const ctx: BoardContext = {
		boardId: board.id,
		title: board.title,
		surveyId: board.survey_id,
		surveyTitle: board.survey_title,
		machine: {
			id: machine.id,
			name: machine.name,
			tag: machine.tag,
			hazardousArea: machine.hazardousArea,
			input: {
				speedRpm: machine.speedRpm as number,
				speedMode: machine.speedMode,
				hasSpeedSignal: machine.speedSignal,
				hazardousArea: machine.hazardousArea
			}
		},
		media: media ? { url: media.displayUrl, width: media.width, height: media.height, kind: media.kind } : null,
		supplyPoints: supply.items.map((s) => ({ id: s.id, name: s.name, tag: s.tag, voltageV: s.voltageV, areaName: s.areaName ?? null })),
		// Stored overrides as they are: the rule engine reports bad ones as findings.
		thresholds: thresholds.overrides as Record<string, unknown>,
		user: { id: viewer.userId, name: viewer.name, role: viewer.role },
		canEdit: !access.readOnly,
		canDecide: can(viewer.role, 'review.decide'),
		frozen
	};
	return {
		ctx,
		access: { readOnly: access.readOnly, reason: access.reason, surveyStatus: board.survey_status },
		// For CommentThread on the board (survey, board, point and route comments).
		comments: { surveyId: board.survey_id, boardId: board.id, members, canWrite: can(viewer.role, 'comment.write') },
		revisions,
		compare:
			compareNumber && revisions.includes(compareNumber) && comparePoints
				? {
						number: compareNumber,
						points: comparePoints.map((p) => ({ id: p.id, label: p.label, x: Number(p.x), y: Number(p.y), status: p.status }))
					}
				: null
	};
};
