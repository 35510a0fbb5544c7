// Approval freezes a revision: on the demo survey, the revision rows equal the board documents
// field by field; reopening and approving again writes revision 2, and comparing the two gives
// the known list.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createHash } from 'node:crypto';
import * as Y from 'yjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { seedDemo, DEMO_ORG } from '../../src/lib/server/db/seed';
import { DEMO_SURVEY } from '../../src/lib/server/db/seed-survey';
import { diskStorage } from '../../src/lib/server/storage/index';
import { readDocument } from '../../src/lib/server/collab/persistence';
import { transitionSurvey, WorkflowError } from '../../src/lib/server/review/workflow';
import { compareStored, getRevision } from '../../src/lib/server/review/revisions';
import { maps, movePoint, readBoard, updatePoint } from '../../src/lib/board/model';
import { evaluateBoard } from '../../src/lib/trade';
import { getMachine } from '../../src/lib/server/db/machines';

let t: TestDatabase;
let org: string;
let surveyId: string;
let boardId: string;
let engineer: { userId: string; role: 'engineer' };
let tech: { userId: string; role: 'technician' };

beforeAll(async () => {
	t = await createTestDatabase();
	await seedDemo(t.db, [], { storage: diskStorage(mkdtempSync(join(tmpdir(), 'spotface-rev-'))), states: false });
	org = (await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirstOrThrow()).id;
	surveyId = (
		await t.db
			.selectFrom('survey')
			.select('id')
			.where('organisation_id', '=', org)
			.where('title', '=', DEMO_SURVEY)
			.executeTakeFirstOrThrow()
	).id;
	boardId = (await t.db.selectFrom('board').select('id').where('survey_id', '=', surveyId).executeTakeFirstOrThrow()).id;
	const user = (email: string) => t.db.selectFrom('app_user').select('id').where('email', '=', email).executeTakeFirstOrThrow();
	engineer = { userId: (await user('engineer@harrowgate.example')).id, role: 'engineer' };
	tech = { userId: (await user('tech@harrowgate.example')).id, role: 'technician' };
});
afterAll(async () => t?.drop());

async function storedDoc() {
	const doc = new Y.Doc();
	Y.applyUpdate(doc, (await readDocument(t.db, boardId))!);
	return doc;
}

/** Writes a change to the stored board as the live board would (one log row). */
async function change(edit: (doc: Y.Doc) => void) {
	const doc = await storedDoc();
	const sv = Y.encodeStateVector(doc);
	edit(doc);
	await t.db
		.insertInto('board_update')
		.values({ board_id: boardId, update: Buffer.from(Y.encodeStateAsUpdate(doc, sv)), user_id: tech.userId })
		.execute();
}

describe('approving the demo survey', () => {
	it('asks to confirm undecided points, and records the confirmation', async () => {
		await transitionSurvey(t.db, { organisationId: org, surveyId, name: 'submit', actor: tech, note: 'All three points marked' });
		const err = await transitionSurvey(t.db, { organisationId: org, surveyId, name: 'approve', actor: engineer }).catch((e) => e);
		expect(err).toBeInstanceOf(WorkflowError);
		expect(err.status).toBe(409);
		expect(err.exceptions.map((x: { label: string; status: string }) => `${x.label}:${x.status}`).sort()).toEqual([
			'P1:proposed',
			'P2:proposed',
			'P3:proposed'
		]);
		expect(await t.db.selectFrom('survey_revision').select('id').execute()).toHaveLength(0);
		expect((await t.db.selectFrom('survey').select('status').where('id', '=', surveyId).executeTakeFirstOrThrow()).status).toBe(
			'submitted'
		);

		const r = await transitionSurvey(t.db, {
			organisationId: org,
			surveyId,
			name: 'approve',
			actor: engineer,
			note: 'Approved with P2 to be looked at',
			confirmExceptions: true
		});
		expect(r.revision?.number).toBe(1);
		const rev = await getRevision(t.db, org, surveyId, 1);
		expect(rev!.revision).toMatchObject({ approved_by: engineer.userId, note: 'Approved with P2 to be looked at' });
		expect(rev!.revision.confirmed_exceptions).toHaveLength(3);
		expect(
			(await t.db.selectFrom('board').select('frozen_at').where('id', '=', boardId).executeTakeFirstOrThrow()).frozen_at
		).not.toBeNull();
	});

	it('the revision rows equal the board document field by field', async () => {
		const doc = await storedDoc();
		const board = readBoard(doc);
		const m = maps(doc);
		const rev = (await getRevision(t.db, org, surveyId, 1))!;
		expect(rev.boards).toHaveLength(1);
		const rb = rev.boards[0];
		expect(rb.board_id).toBe(boardId);
		expect(rb.state_vector_sha256).toBe(createHash('sha256').update(Y.encodeStateVector(doc)).digest('hex'));
		expect([rb.scale_ax, rb.scale_ay, rb.scale_bx, rb.scale_by, rb.scale_length_mm]).toEqual([
			...board.scale!.a,
			...board.scale!.b,
			board.scale!.lengthMm
		]);

		const machineId = (await t.db.selectFrom('board').select('machine_id').where('id', '=', boardId).executeTakeFirstOrThrow()).machine_id;
		const machine = (await getMachine(t.db, org, machineId))!;
		const ev = evaluateBoard(board, {
			machine: {
				speedRpm: machine.speedRpm as number,
				speedMode: machine.speedMode,
				hasSpeedSignal: machine.speedSignal,
				hazardousArea: machine.hazardousArea
			},
			thresholds: {}
		});

		expect(rev.points).toHaveLength(board.points.length);
		for (const p of board.points) {
			const row = rev.points.find((x) => x.point_id === p.id)!;
			expect(row, p.label).toBeTruthy();
			expect({
				label: row.label,
				component: row.component,
				x: row.x,
				y: row.y,
				status: row.status,
				direction: row.direction,
				surface: row.surface,
				mounting: row.mounting,
				material: row.material,
				flatDiameterMm: row.flat_diameter_mm,
				wallThicknessMm: row.wall_thickness_mm,
				distanceToBearingMm: row.distance_to_bearing_mm,
				surfaceTempC: row.surface_temp_c,
				notes: row.notes,
				createdBy: row.created_by
			}).toEqual({
				label: p.label,
				component: p.component,
				x: p.x,
				y: p.y,
				status: p.status,
				direction: p.direction,
				surface: p.surface,
				mounting: p.mounting,
				material: p.material,
				flatDiameterMm: p.flatDiameterMm,
				wallThicknessMm: p.wallThicknessMm,
				distanceToBearingMm: p.distanceToBearingMm,
				surfaceTempC: p.surfaceTempC,
				notes: p.notes,
				createdBy: p.createdBy
			});
			expect(row.decision).toBeNull(); // all proposed
			expect(row.fields).toEqual((m.points.get(p.id) as Y.Map<unknown>).toJSON());
			expect(row.findings).toEqual(JSON.parse(JSON.stringify(ev.points.get(p.id)!.findings)));
			expect(row.worst).toBe(ev.points.get(p.id)!.worst);
			expect(row.distance_used_mm).toBe(ev.points.get(p.id)!.distance.mm);
		}
		// The fan-cowl point fails (sheet metal), as the demo intends.
		expect(rev.points.find((x) => x.surface === 'sheet_cover')!.worst).toBe('fail');

		expect(rev.routes).toHaveLength(board.routes.length);
		for (const r of board.routes) {
			const row = rev.routes.find((x) => x.route_id === r.id)!;
			const g = ev.routes.get(r.id)!.geometry;
			expect({
				pointId: row.point_id,
				supplyPointId: row.supply_point_id,
				exitLabel: row.exit_label,
				vertices: row.vertices,
				crossSectionMm2: row.cross_section_mm2,
				fixings: row.fixings,
				supplyV: row.supply_v,
				notes: row.notes,
				lengthM: row.length_m,
				lengthSource: row.length_source,
				photoLengthM: row.photo_length_m
			}).toEqual({
				pointId: r.pointId,
				supplyPointId: r.supplyPointId,
				exitLabel: r.exitLabel,
				vertices: r.vertices,
				crossSectionMm2: r.crossSectionMm2,
				fixings: r.fixings,
				supplyV: r.supplyV,
				notes: r.notes,
				lengthM: g.lengthM,
				lengthSource: g.lengthSource,
				photoLengthM: g.photoLengthM
			});
			expect(row.fields).toEqual((m.routes.get(r.id) as Y.Map<unknown>).toJSON());
			expect(row.findings).toEqual(JSON.parse(JSON.stringify(ev.routes.get(r.id)!.findings)));
		}
		// One route was typed in (18 m), the other measured on the photo with the scale.
		expect(rev.routes.map((x) => x.length_source).sort()).toEqual(['entered', 'scale']);

		expect(rev.zones).toHaveLength(board.zones.length);
		for (const z of board.zones) {
			const row = rev.zones.find((x) => x.zone_id === z.id)!;
			expect({ label: row.label, kind: row.kind, polygon: row.polygon }).toEqual({ label: z.label, kind: z.kind, polygon: z.polygon });
			expect(row.fields).toEqual((m.zones.get(z.id) as Y.Map<unknown>).toJSON());
		}
	});

	it('reopening unfreezes; the next approval is revision 2; revision 1 stays; comparing gives the known list', async () => {
		await expect(transitionSurvey(t.db, { organisationId: org, surveyId, name: 'reopen', actor: tech, note: 'x' })).rejects.toMatchObject({
			status: 403
		});
		await transitionSurvey(t.db, { organisationId: org, surveyId, name: 'reopen', actor: engineer, note: 'P2 must move off the fan cowl' });
		expect((await t.db.selectFrom('board').select('frozen_at').where('id', '=', boardId).executeTakeFirstOrThrow()).frozen_at).toBeNull();

		const before = readBoard(await storedDoc());
		const cowl = before.points.find((p) => p.surface === 'sheet_cover')!;
		const good = before.points.find((p) => p.surface === 'machined_housing')!;
		// The technician moves the cowl point 30 px right and 40 px down, onto the housing.
		await change((doc) => {
			movePoint(doc, cowl.id, cowl.x + 30, cowl.y + 40);
			updatePoint(doc, cowl.id, { surface: 'machined_housing', wallThicknessMm: 12 });
		});
		await transitionSurvey(t.db, { organisationId: org, surveyId, name: 'submit', actor: tech });
		await change((doc) => updatePoint(doc, good.id, { status: 'approved' }));
		const r2 = await transitionSurvey(t.db, { organisationId: org, surveyId, name: 'approve', actor: engineer, confirmExceptions: true });
		expect(r2.revision?.number).toBe(2);
		expect((await getRevision(t.db, org, surveyId, 1))!.points.find((p) => p.point_id === cowl.id)!.x).toBe(cowl.x);

		const diff = (await compareStored(t.db, org, surveyId, 1, 2))!;
		expect(diff.points.added).toEqual([]);
		expect(diff.points.removed).toEqual([]);
		// 50 px on the demo sketch, whose reference line is 520 px for 800 mm: 76.9 mm.
		expect(diff.points.moved.map((x) => [x.item.label, x.distancePx, x.distanceMm])).toEqual([[cowl.label, 50, 76.9]]);
		expect(diff.points.changed.map((c) => [c.item.label, c.changes.map((x) => `${x.field}:${x.before}→${x.after}`)])).toEqual(
			[
				[good.label, ['status:proposed→approved']],
				[cowl.label, ['surface:sheet_cover→machined_housing', 'wallThicknessMm:2→12']]
			].sort((a, b) => String(a[0]).localeCompare(String(b[0]), undefined, { numeric: true }))
		);
		expect(diff.routes).toEqual({ added: [], removed: [], moved: [], changed: [] });
		expect(await compareStored(t.db, org, surveyId, 1, 3)).toBeNull();
	});
});
