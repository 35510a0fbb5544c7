// What is still open on a survey's boards, read from the stored documents with the server-side
// findings: points with a "check" or "fail" finding, boards with no point, routes with no supply,
// and points the engineer has not decided on.
import type { DB } from '../db/index';
import { getMachine } from '../db/machines';
import { getThresholds } from '../db/thresholds';
import { readBoard } from '../../board/model';
import { evaluateBoard, compareLabels } from '../../trade';
import { machineInputOf, readBoardDocIn } from './revisions';

export interface BoardOpenItems {
	boardId: string;
	title: string;
	points: number;
	/** Points whose worst finding is a check (warn) or a fail. */
	findings: Array<{ pointId: string; label: string; worst: 'warn' | 'fail' }>;
	/** Routes with neither a supply point nor an exit label. */
	routesWithoutSupply: Array<{ routeId: string; pointLabel: string }>;
	/** Points still proposed or flagged (no decision yet). */
	undecided: Array<{ pointId: string; label: string; status: string }>;
	rejected: Array<{ pointId: string; label: string }>;
}

export async function surveyOpenItems(db: DB, organisationId: string, surveyId: string): Promise<BoardOpenItems[]> {
	const boards = await db
		.selectFrom('board')
		.select(['id', 'title', 'machine_id'])
		.where('organisation_id', '=', organisationId)
		.where('survey_id', '=', surveyId)
		.orderBy('created_at')
		.execute();
	if (boards.length === 0) return [];
	const thresholds = (await getThresholds(db, organisationId)).overrides as Record<string, unknown>;
	const out: BoardOpenItems[] = [];
	for (const b of boards) {
		const machine = await getMachine(db, organisationId, b.machine_id);
		const doc = await readBoardDocIn(db, b.id);
		try {
			const board = readBoard(doc);
			const ev = evaluateBoard(board, { machine: machineInputOf(machine), thresholds });
			const points = [...board.points].sort((x, y) => compareLabels(x.label, y.label));
			const labelOf = new Map(board.points.map((p) => [p.id, p.label]));
			out.push({
				boardId: b.id,
				title: b.title,
				points: points.length,
				findings: points
					.map((p) => ({ pointId: p.id, label: p.label, worst: ev.points.get(p.id)?.worst ?? 'pass' }))
					.filter((p): p is { pointId: string; label: string; worst: 'warn' | 'fail' } => p.worst !== 'pass'),
				routesWithoutSupply: board.routes
					.filter((r) => !r.supplyPointId && !r.exitLabel.trim())
					.map((r) => ({ routeId: r.id, pointLabel: labelOf.get(r.pointId) ?? '?' })),
				undecided: points
					.filter((p) => p.status === 'proposed' || p.status === 'flagged')
					.map((p) => ({ pointId: p.id, label: p.label, status: p.status })),
				rejected: points.filter((p) => p.status === 'rejected').map((p) => ({ pointId: p.id, label: p.label }))
			});
		} finally {
			doc.destroy();
		}
	}
	return out;
}
