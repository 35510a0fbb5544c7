// Approved revisions for an outside system: a changes-since feed in a stable order
// (approval time, then id) with an opaque cursor, and one revision with its points.
import { sql } from 'kysely';
import type { z } from 'zod';
import type { DB } from '../db/index';
import { isUuid } from '../../schemas/ids';
import type { findingSchema, revisionDetailSchema, revisionFeedSchema, revisionSummarySchema } from '../../schemas/integration';

type Summary = z.infer<typeof revisionSummarySchema>;

export function encodeCursor(id: string): string {
	return Buffer.from(`r:${id}`).toString('base64url');
}

export function decodeCursor(cursor: string): string | null {
	const s = Buffer.from(cursor, 'base64url').toString('utf8');
	return s.startsWith('r:') && isUuid(s.slice(2)) ? s.slice(2) : null;
}

function summaryQuery(db: DB, organisationId: string) {
	return db
		.selectFrom('survey_revision')
		.innerJoin('survey', 'survey.id', 'survey_revision.survey_id')
		.leftJoin('app_user', 'app_user.id', 'survey_revision.approved_by')
		.select([
			'survey_revision.id',
			'survey_revision.survey_id',
			'survey.title as survey_title',
			'survey.site_id',
			'survey_revision.number',
			'survey_revision.approved_at',
			'survey_revision.approved_by',
			'survey_revision.note',
			'app_user.name as approver_name',
			(eb) =>
				eb
					.selectFrom('revision_point')
					.select((e) => e.fn.countAll<string>().as('n'))
					.whereRef('revision_point.revision_id', '=', 'survey_revision.id')
					.as('point_count')
		])
		.where('survey_revision.organisation_id', '=', organisationId);
}

type SummaryRow = Awaited<ReturnType<ReturnType<typeof summaryQuery>['execute']>>[number];

function summaryOf(r: SummaryRow): Summary {
	return {
		id: r.id,
		surveyId: r.survey_id,
		surveyTitle: r.survey_title,
		siteId: r.site_id,
		number: Number(r.number),
		approvedAt: new Date(r.approved_at).toISOString(),
		approvedBy: r.approved_by,
		approverName: r.approver_name,
		note: r.note,
		pointCount: Number(r.point_count ?? 0),
		href: `/api/v1/revisions/${r.id}`
	};
}

export class CursorError extends Error {}

/** Revisions approved at or after `since`, oldest first; `cursor` continues after a page. */
export async function revisionsSince(
	db: DB,
	organisationId: string,
	q: { since?: string; cursor?: string; limit: number }
): Promise<z.infer<typeof revisionFeedSchema>> {
	let query = summaryQuery(db, organisationId);
	if (q.since) query = query.where('survey_revision.approved_at', '>=', new Date(q.since));
	if (q.cursor) {
		const id = decodeCursor(q.cursor);
		if (!id) throw new CursorError('This cursor is not one this feed gave out.');
		const after = await db
			.selectFrom('survey_revision')
			.select(['approved_at', 'id'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', id)
			.executeTakeFirst();
		if (!after) throw new CursorError('This cursor is not one this feed gave out.');
		// Compared in the database at its full (microsecond) precision.
		query = query.where(
			sql<boolean>`(survey_revision.approved_at, survey_revision.id) > (select approved_at, id from survey_revision where id = ${id})`
		);
	}
	const rows = await query
		.orderBy('survey_revision.approved_at')
		.orderBy('survey_revision.id')
		.limit(q.limit + 1)
		.execute();
	const page = rows.slice(0, q.limit);
	return { items: page.map(summaryOf), nextCursor: rows.length > q.limit ? encodeCursor(page[page.length - 1].id) : null };
}

/** One revision of the organisation with its boards and points; null when there is none. */
export async function revisionDetail(db: DB, organisationId: string, id: string): Promise<z.infer<typeof revisionDetailSchema> | null> {
	if (!isUuid(id)) return null;
	const r = await summaryQuery(db, organisationId).where('survey_revision.id', '=', id).executeTakeFirst();
	if (!r) return null;
	const [boards, points] = await Promise.all([
		db
			.selectFrom('revision_board')
			.select(['id', 'board_id', 'machine_id', 'title'])
			.where('revision_id', '=', id)
			.orderBy('title')
			.orderBy('id')
			.execute(),
		db
			.selectFrom('revision_point')
			.innerJoin('revision_board', 'revision_board.id', 'revision_point.revision_board_id')
			.selectAll('revision_point')
			.select(['revision_board.board_id', 'revision_board.machine_id'])
			.where('revision_point.revision_id', '=', id)
			.orderBy('revision_board.title')
			.orderBy('revision_point.label')
			.orderBy('revision_point.point_id')
			.execute()
	]);
	return {
		...summaryOf(r),
		boards: boards.map((b) => ({ id: b.id, boardId: b.board_id, machineId: b.machine_id, title: b.title })),
		points: points.map((p) => ({
			pointId: p.point_id,
			boardId: p.board_id,
			machineId: p.machine_id,
			label: p.label,
			component: p.component,
			status: p.status,
			decisionReason: p.decision_reason,
			direction: p.direction,
			surface: p.surface,
			mounting: p.mounting,
			material: p.material,
			flatDiameterMm: p.flat_diameter_mm,
			wallThicknessMm: p.wall_thickness_mm,
			distanceToBearingMm: p.distance_to_bearing_mm,
			surfaceTempC: p.surface_temp_c,
			notes: p.notes,
			x: p.x,
			y: p.y,
			worst: p.worst as 'pass' | 'warn' | 'fail',
			findings: (p.findings as z.infer<typeof findingSchema>[]) ?? []
		}))
	};
}
