// Approved revisions stored as rows: what the engineer approved, readable without the live
// board. Written inside the approval's transaction (the survey and its boards are locked by the
// caller), so no update can land between reading a board and freezing it.
import { createHash } from 'node:crypto';
import * as Y from 'yjs';
import type { Transaction } from 'kysely';
import type { DB } from '../db/index';
import type { Database } from '../db/types';
import type { RevisionException } from '../db/review-types';
import { getMachine } from '../db/machines';
import { getThresholds } from '../db/thresholds';
import { maps, readBoard, type BoardSnapshot } from '../../board/model';
import { evaluateBoard, type BoardEvaluation } from '../../trade';
import { checkBoardChange } from '../../board/model/policy';
import { compareRevisions, type ComparableRevision } from '../../survey/compare';

type Trx = Transaction<Database>;

export interface RevisionExceptionsNeeded {
	ok: false;
	exceptions: RevisionException[];
}

/**
 * A board's stored document (snapshot, then every log row) read inside the caller's transaction.
 * The caller holds the board row FOR UPDATE, which the append statement's FOR KEY SHARE waits
 * for, so the log cannot grow while it is read.
 */
export async function readBoardDocIn(trx: Trx | DB, boardId: string): Promise<Y.Doc> {
	const doc = new Y.Doc();
	const b = await trx.selectFrom('board').select(['snapshot']).where('id', '=', boardId).executeTakeFirst();
	if (b?.snapshot) Y.applyUpdate(doc, b.snapshot);
	const rows = await trx.selectFrom('board_update').select(['seq', 'update']).where('board_id', '=', boardId).orderBy('seq').execute();
	for (const r of rows) {
		try {
			Y.applyUpdate(doc, r.update);
		} catch (e) {
			console.error(`[review] board ${boardId}: stored update ${r.seq} cannot be applied: ${(e as Error).message}`);
		}
	}
	return doc;
}

export function stateVectorHash(doc: Y.Doc): string {
	return createHash('sha256').update(Y.encodeStateVector(doc)).digest('hex');
}

/** Every field of an item as stored (including fields this version does not model). */
function rawFields(m: unknown): Record<string, unknown> {
	return m instanceof Y.Map ? (m.toJSON() as Record<string, unknown>) : {};
}

function decisionReason(raw: Record<string, unknown>): string | null {
	for (const key of ['decisionReason', 'reason']) if (typeof raw[key] === 'string' && raw[key] !== '') return raw[key] as string;
	return null;
}

/** Points that are not approved: rejected, flagged or still proposed. */
export function exceptionsOf(boardId: string, board: BoardSnapshot): RevisionException[] {
	return board.points.filter((p) => p.status !== 'approved').map((p) => ({ boardId, pointId: p.id, label: p.label, status: p.status }));
}

/** What the rule engine needs of a machine from the register. */
export function machineInputOf(machine: Awaited<ReturnType<typeof getMachine>>) {
	return {
		speedRpm: machine?.speedRpm as number,
		speedMode: machine?.speedMode ?? 'constant',
		hasSpeedSignal: machine?.speedSignal ?? false,
		hazardousArea: machine?.hazardousArea ?? false
	};
}

interface BoardRead {
	id: string;
	machineId: string;
	mediaId: string | null;
	title: string;
	doc: Y.Doc;
	board: BoardSnapshot;
	evaluation: BoardEvaluation;
}

async function readBoards(trx: Trx, organisationId: string, surveyId: string): Promise<BoardRead[]> {
	const rows = await trx
		.selectFrom('board')
		.select(['id', 'machine_id', 'media_id', 'title'])
		.where('organisation_id', '=', organisationId)
		.where('survey_id', '=', surveyId)
		.orderBy('created_at')
		.orderBy('id')
		.execute();
	const thresholds = (await getThresholds(trx, organisationId)).overrides as Record<string, unknown>;
	const out: BoardRead[] = [];
	for (const r of rows) {
		const machine = await getMachine(trx, organisationId, r.machine_id);
		const doc = await readBoardDocIn(trx, r.id);
		const board = readBoard(doc);
		const evaluation = evaluateBoard(board, { machine: machineInputOf(machine), thresholds });
		out.push({ id: r.id, machineId: r.machine_id, mediaId: r.media_id, title: r.title, doc, board, evaluation });
	}
	return out;
}

/** A board holds content the board model does not accept: it cannot be approved as it is. */
export class RevisionContentError extends Error {
	constructor(readonly problems: string[]) {
		super(`A board holds something the board does not accept, so the layout cannot be approved yet: ${problems.join(' · ')}`);
	}
}

/**
 * Writes the next revision of a survey from its boards as they are stored now. Returns the
 * exceptions instead when there are rejected or undecided points and they were not confirmed.
 */
export async function writeRevision(
	trx: Trx,
	input: { organisationId: string; surveyId: string; approvedBy: string; approvedAt: Date; note: string; confirmExceptions: boolean }
): Promise<{ ok: true; revision: { id: string; number: number } } | RevisionExceptionsNeeded> {
	const boards = await readBoards(trx, input.organisationId, input.surveyId);
	try {
		// What is approved must be what the board model accepts: each board's whole content is
		// run through the board policy as if the approving engineer had written it at once.
		const invalid = boards.flatMap((b) => {
			const r = checkBoardChange(
				new Y.Doc(),
				Y.encodeStateAsUpdate(b.doc),
				{ role: 'engineer', userId: input.approvedBy, name: '' },
				{ frozen: false, limits: { maxUpdateBytes: Number.MAX_SAFE_INTEGER, maxDocumentBytes: Number.MAX_SAFE_INTEGER } }
			);
			return r.ok
				? []
				: [
						`${b.title}: ${r.refusals
							.map((x) => x.reason)
							.slice(0, 3)
							.join(' ')}`
					];
		});
		if (invalid.length) throw new RevisionContentError(invalid);
		const exceptions = boards.flatMap((b) => exceptionsOf(b.id, b.board));
		if (exceptions.length > 0 && !input.confirmExceptions) return { ok: false, exceptions };
		const last = await trx
			.selectFrom('survey_revision')
			.select((eb) => eb.fn.max('number').as('n'))
			.where('survey_id', '=', input.surveyId)
			.executeTakeFirst();
		const number = Number(last?.n ?? 0) + 1;
		const rev = await trx
			.insertInto('survey_revision')
			.values({
				organisation_id: input.organisationId,
				survey_id: input.surveyId,
				number,
				approved_by: input.approvedBy,
				approved_at: input.approvedAt,
				note: input.note,
				confirmed_exceptions: exceptions.length ? JSON.stringify(exceptions) : null
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		for (const b of boards) {
			const m = maps(b.doc);
			const scale = b.board.scale;
			const rb = await trx
				.insertInto('revision_board')
				.values({
					revision_id: rev.id,
					board_id: b.id,
					machine_id: b.machineId,
					media_id: b.mediaId,
					title: b.title,
					state_vector_sha256: stateVectorHash(b.doc),
					scale_ax: scale?.a[0] ?? null,
					scale_ay: scale?.a[1] ?? null,
					scale_bx: scale?.b[0] ?? null,
					scale_by: scale?.b[1] ?? null,
					scale_length_mm: scale?.lengthMm ?? null
				})
				.returning('id')
				.executeTakeFirstOrThrow();
			if (b.board.points.length) {
				await trx
					.insertInto('revision_point')
					.values(
						b.board.points.map((p) => {
							const ev = b.evaluation.points.get(p.id);
							const raw = rawFields(m.points.get(p.id));
							return {
								revision_board_id: rb.id,
								revision_id: rev.id,
								point_id: p.id,
								label: p.label,
								component: p.component,
								x: p.x,
								y: p.y,
								status: p.status,
								decision: p.status === 'proposed' ? null : p.status,
								decision_reason: decisionReason(raw),
								direction: p.direction,
								surface: p.surface,
								mounting: p.mounting,
								material: p.material,
								flat_diameter_mm: p.flatDiameterMm,
								wall_thickness_mm: p.wallThicknessMm,
								distance_to_bearing_mm: p.distanceToBearingMm,
								distance_used_mm: ev?.distance.mm ?? null,
								distance_source: ev?.distance.source ?? null,
								surface_temp_c: p.surfaceTempC,
								notes: p.notes,
								created_by: p.createdBy,
								fields: JSON.stringify(raw),
								findings: JSON.stringify(ev?.findings ?? []),
								worst: ev?.worst ?? 'pass'
							};
						})
					)
					.execute();
			}
			if (b.board.routes.length) {
				await trx
					.insertInto('revision_route')
					.values(
						b.board.routes.map((r) => {
							const ev = b.evaluation.routes.get(r.id);
							return {
								revision_board_id: rb.id,
								revision_id: rev.id,
								route_id: r.id,
								point_id: r.pointId,
								supply_point_id: r.supplyPointId,
								exit_label: r.exitLabel,
								vertices: JSON.stringify(r.vertices),
								length_m: ev?.geometry.lengthM ?? null,
								length_source: ev?.geometry.lengthSource ?? null,
								photo_length_m: ev?.geometry.photoLengthM ?? null,
								cross_section_mm2: r.crossSectionMm2,
								fixings: r.fixings,
								supply_v: r.supplyV,
								notes: r.notes,
								fields: JSON.stringify(rawFields(m.routes.get(r.id))),
								findings: JSON.stringify(ev?.findings ?? []),
								worst: ev?.worst ?? 'pass'
							};
						})
					)
					.execute();
			}
			if (b.board.zones.length) {
				await trx
					.insertInto('revision_zone')
					.values(
						b.board.zones.map((z) => ({
							revision_board_id: rb.id,
							revision_id: rev.id,
							zone_id: z.id,
							label: z.label,
							kind: z.kind,
							polygon: JSON.stringify(z.polygon),
							fields: JSON.stringify(rawFields(m.zones.get(z.id)))
						}))
					)
					.execute();
			}
		}
		return { ok: true, revision: { id: rev.id, number } };
	} finally {
		for (const b of boards) b.doc.destroy();
	}
}

export function listRevisions(db: DB, organisationId: string, surveyId: string) {
	return db
		.selectFrom('survey_revision')
		.leftJoin('app_user', 'app_user.id', 'survey_revision.approved_by')
		.select([
			'survey_revision.id',
			'survey_revision.number',
			'survey_revision.approved_at',
			'survey_revision.approved_by',
			'survey_revision.note',
			'survey_revision.confirmed_exceptions',
			'app_user.name as approver_name'
		])
		.where('survey_revision.organisation_id', '=', organisationId)
		.where('survey_revision.survey_id', '=', surveyId)
		.orderBy('survey_revision.number')
		.execute();
}

/** One revision with all its rows, or null when not the organisation's survey's. */
export async function getRevision(db: DB, organisationId: string, surveyId: string, number: number) {
	const rev = await db
		.selectFrom('survey_revision')
		.leftJoin('app_user', 'app_user.id', 'survey_revision.approved_by')
		.selectAll('survey_revision')
		.select('app_user.name as approver_name')
		.where('survey_revision.organisation_id', '=', organisationId)
		.where('survey_revision.survey_id', '=', surveyId)
		.where('survey_revision.number', '=', number)
		.executeTakeFirst();
	if (!rev) return null;
	const [boards, points, routes, zones] = await Promise.all([
		db.selectFrom('revision_board').selectAll().where('revision_id', '=', rev.id).orderBy('title').execute(),
		db.selectFrom('revision_point').selectAll().where('revision_id', '=', rev.id).execute(),
		db.selectFrom('revision_route').selectAll().where('revision_id', '=', rev.id).execute(),
		db.selectFrom('revision_zone').selectAll().where('revision_id', '=', rev.id).execute()
	]);
	return { revision: rev, boards, points, routes, zones };
}

export type RevisionData = NonNullable<Awaited<ReturnType<typeof getRevision>>>;

/** A stored revision in the shape compareRevisions takes. */
export function comparableOf(data: RevisionData): ComparableRevision {
	const boardOf = new Map(data.boards.map((b) => [b.id, b.board_id]));
	return {
		number: data.revision.number,
		boards: data.boards.map((b) => ({
			boardId: b.board_id,
			title: b.title,
			scale:
				b.scale_ax !== null && b.scale_ay !== null && b.scale_bx !== null && b.scale_by !== null && b.scale_length_mm !== null
					? { a: [b.scale_ax, b.scale_ay], b: [b.scale_bx, b.scale_by], lengthMm: b.scale_length_mm }
					: null
		})),
		points: data.points.map((p) => ({
			boardId: boardOf.get(p.revision_board_id)!,
			id: p.point_id,
			label: p.label,
			x: p.x,
			y: p.y,
			fields: p.fields
		})),
		routes: data.routes.map((r) => ({
			boardId: boardOf.get(r.revision_board_id)!,
			id: r.route_id,
			pointId: r.point_id,
			vertices: r.vertices,
			fields: r.fields
		}))
	};
}

/** Revision `from` against revision `to` of a survey; null when either is not found. */
export async function compareStored(db: DB, organisationId: string, surveyId: string, from: number, to: number) {
	const [a, b] = await Promise.all([getRevision(db, organisationId, surveyId, from), getRevision(db, organisationId, surveyId, to)]);
	if (!a || !b) return null;
	return compareRevisions(comparableOf(a), comparableOf(b));
}

/** Revision numbers of a survey, newest first. */
export async function revisionNumbers(db: DB, organisationId: string, surveyId: string): Promise<number[]> {
	const rows = await db
		.selectFrom('survey_revision')
		.select('number')
		.where('organisation_id', '=', organisationId)
		.where('survey_id', '=', surveyId)
		.orderBy('number', 'desc')
		.execute();
	return rows.map((r) => Number(r.number));
}

/** The points of one board as revision `number` approved them (for the board's before/after overlay). */
export async function revisionPointsOfBoard(db: DB, organisationId: string, surveyId: string, boardId: string, number: number) {
	return db
		.selectFrom('revision_point')
		.innerJoin('revision_board', 'revision_board.id', 'revision_point.revision_board_id')
		.innerJoin('survey_revision', 'survey_revision.id', 'revision_board.revision_id')
		.select(['revision_point.point_id as id', 'revision_point.label', 'revision_point.x', 'revision_point.y', 'revision_point.status'])
		.where('survey_revision.organisation_id', '=', organisationId)
		.where('survey_revision.survey_id', '=', surveyId)
		.where('survey_revision.number', '=', number)
		.where('revision_board.board_id', '=', boardId)
		.execute();
}
