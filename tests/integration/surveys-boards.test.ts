// The survey and board repositories against PostgreSQL: tenancy, the status rules, approval
// freezing every board (and telling the live board), and reading a board's stored content.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import pg from 'pg';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { createBoardFixture, waitFor, type BoardFixture } from '../helpers/collab';
import { listTransitions, transitionSurvey } from '../../src/lib/server/review/workflow';
import * as surveys from '../../src/lib/server/db/surveys';
import * as boards from '../../src/lib/server/db/boards';
import { freezeBoard, unfreezeBoard } from '../../src/lib/server/boards/service';
import { BOARD_CHANNEL } from '../../src/lib/server/collab/notify';
import { compact } from '../../src/lib/server/collab/persistence';

let t: TestDatabase;
let f: BoardFixture;
let other: BoardFixture;

beforeAll(async () => {
	t = await createTestDatabase();
	f = await createBoardFixture(t.db, { boards: 2 });
	other = await createBoardFixture(t.db, { name: 'Elsewhere Water' });
});
afterAll(async () => t?.drop());

describe('surveys', () => {
	it('creates a survey with machines and assignees of the organisation only', async () => {
		const s = await surveys.create(t.db, f.organisationId, f.people.engineer.userId, {
			siteId: f.siteId,
			title: 'Blower house walk',
			plannedDate: '2026-12-14',
			machineIds: f.machineIds,
			assignees: [
				{ userId: f.people.engineer.userId, role: 'engineer' },
				{ userId: f.people.technician.userId, role: 'technician' }
			]
		});
		expect(s).toBeTruthy();
		const got = await surveys.get(t.db, f.organisationId, s!.id);
		expect(got).toMatchObject({ title: 'Blower house walk', status: 'planned', planned_date: '2026-12-14', site_name: 'Lower Works' });
		expect((await surveys.listMachines(t.db, f.organisationId, s!.id)).map((m) => m.id)).toEqual(f.machineIds);
		expect((await surveys.listAssignees(t.db, f.organisationId, s!.id)).map((a) => a.role).sort()).toEqual(['engineer', 'technician']);

		// Another organisation's survey, site, machine or person is not reachable.
		expect(await surveys.get(t.db, other.organisationId, s!.id)).toBeUndefined();
		expect(await surveys.create(t.db, f.organisationId, null, { siteId: other.siteId, title: 'x' })).toBeNull();
		await expect(surveys.setMachines(t.db, f.organisationId, s!.id, [other.machineIds[0]])).rejects.toThrow(/machine of the survey’s site/);
		await expect(
			surveys.setAssignees(t.db, f.organisationId, s!.id, [{ userId: other.people.technician.userId, role: 'technician' }])
		).rejects.toThrow(/Only members/);
	});

	it('an edited plan is saved whole or not at all', async () => {
		const s = await surveys.create(t.db, f.organisationId, null, { siteId: f.siteId, title: 'Plan before', machineIds: [f.machineIds[0]] });
		// A machine of another organisation is refused, and the new title is not kept either.
		await expect(
			surveys.replacePlan(t.db, f.organisationId, s!.id, { title: 'Plan after', machineIds: [other.machineIds[0]], assignees: [] })
		).rejects.toThrow(surveys.SurveyRuleError);
		expect((await surveys.get(t.db, f.organisationId, s!.id))!.title).toBe('Plan before');
		expect((await surveys.listMachines(t.db, f.organisationId, s!.id)).map((m) => m.id)).toEqual([f.machineIds[0]]);

		expect(
			await surveys.replacePlan(t.db, f.organisationId, s!.id, {
				title: 'Plan after',
				machineIds: f.machineIds,
				assignees: [{ userId: f.people.technician.userId, role: 'technician' }]
			})
		).toBe(true);
		expect((await surveys.get(t.db, f.organisationId, s!.id))!.title).toBe('Plan after');
		expect((await surveys.listAssignees(t.db, f.organisationId, s!.id)).map((a) => a.role)).toEqual(['technician']);
		// Another organisation's survey is not found.
		expect(await surveys.replacePlan(t.db, other.organisationId, s!.id, { title: 'x', machineIds: [], assignees: [] })).toBe(false);
	});

	it('moves through the statuses in order only, each move kept with who made it', async () => {
		const s = (await surveys.create(t.db, f.organisationId, null, { siteId: f.siteId, title: 'Order' }))!;
		const eng = { userId: f.people.engineer.userId, role: 'engineer' as const };
		const tech = { userId: f.people.technician.userId, role: 'technician' as const };
		const move = (
			name: Parameters<typeof transitionSurvey>[1]['name'],
			actor: Parameters<typeof transitionSurvey>[1]['actor'] = eng,
			note = '',
			organisationId = f.organisationId
		) => transitionSurvey(t.db, { organisationId, surveyId: s.id, name, actor, note });
		await expect(move('approve')).rejects.toMatchObject({
			status: 409,
			message: expect.stringMatching(/only possible when it is submitted/)
		});
		expect(await move('start', tech)).toMatchObject({ id: s.id, from: 'planned', to: 'walking' });
		expect(await move('submit', tech, 'All photos done')).toMatchObject({ to: 'submitted' });
		await expect(move('request_changes')).rejects.toMatchObject({ status: 400 });
		expect(await move('request_changes', eng, 'Move P2 off the cowl')).toMatchObject({ to: 'changes_requested' });
		await expect(move('submit', tech, '', other.organisationId)).rejects.toMatchObject({ status: 404 });
		const history = await listTransitions(t.db, f.organisationId, s.id);
		expect(history.map((h) => [h.transition, h.from_status, h.to_status, h.actor_user_id, h.note])).toEqual([
			['start', 'planned', 'walking', tech.userId, ''],
			['submit', 'walking', 'submitted', tech.userId, 'All photos done'],
			['request_changes', 'submitted', 'changes_requested', eng.userId, 'Move P2 off the cowl']
		]);
	});

	it('approval freezes every board of the survey and announces it to the live board', async () => {
		const listener = new pg.Client({ connectionString: t.url });
		await listener.connect();
		const heard: string[] = [];
		listener.on('notification', (m) => heard.push(m.payload!));
		await listener.query(`LISTEN ${BOARD_CHANNEL}`);
		const eng = { userId: f.people.engineer.userId, role: 'engineer' as const };
		try {
			await transitionSurvey(t.db, { organisationId: f.organisationId, surveyId: f.surveyId, name: 'submit', actor: eng });
			const r = await transitionSurvey(t.db, { organisationId: f.organisationId, surveyId: f.surveyId, name: 'approve', actor: eng });
			expect(r.revision?.number).toBe(1);
			const rows = await boards.listForSurvey(t.db, f.organisationId, f.surveyId);
			expect(rows).toHaveLength(2);
			expect(rows.every((b) => b.frozen_at !== null && b.survey_status === 'approved')).toBe(true);
			const s = await surveys.get(t.db, f.organisationId, f.surveyId);
			expect(s!.approved_by).toBe(f.people.engineer.userId);
			await expect(
				transitionSurvey(t.db, { organisationId: f.organisationId, surveyId: f.surveyId, name: 'submit', actor: eng })
			).rejects.toMatchObject({
				status: 409
			});
			await waitFor(() => f.boardIds.every((id) => heard.includes(id)), 'both boards announced');
		} finally {
			await listener.end();
		}
	});
});

describe('boards', () => {
	it('are created only for machines of the survey and for media of that machine', async () => {
		const g = await createBoardFixture(t.db, { name: 'Board Rules Works' });
		await expect(
			boards.create(t.db, g.organisationId, { surveyId: g.surveyId, machineId: other.machineIds[0], title: 'x' })
		).rejects.toThrow(/Add the machine to the survey/);
		expect(await boards.create(t.db, other.organisationId, { surveyId: g.surveyId, machineId: g.machineIds[0], title: 'x' })).toBeNull();
		const b = await boards.create(t.db, g.organisationId, { surveyId: g.surveyId, machineId: g.machineIds[0], title: 'Gearbox side' });
		const got = await boards.get(t.db, g.organisationId, b!.id);
		expect(got).toMatchObject({ title: 'Gearbox side', machine_name: 'Raw water pump 1', survey_status: 'walking', frozen_at: null });
		expect(await boards.get(t.db, other.organisationId, b!.id)).toBeUndefined();

		const listener = new pg.Client({ connectionString: t.url });
		await listener.connect();
		const heard: string[] = [];
		listener.on('notification', (m) => heard.push(m.payload!));
		await listener.query(`LISTEN ${BOARD_CHANNEL}`);
		try {
			expect(await freezeBoard(t.db, g.organisationId, b!.id)).toBe(true);
			expect((await boards.get(t.db, g.organisationId, b!.id))!.frozen_at).not.toBeNull();
			await waitFor(() => heard.length === 1, 'the freeze announced');
			expect(await unfreezeBoard(t.db, g.organisationId, b!.id)).toBe(true);
			expect((await boards.get(t.db, g.organisationId, b!.id))!.frozen_at).toBeNull();
			await waitFor(() => heard.length === 2, 'the unfreeze announced');
			expect(await freezeBoard(t.db, other.organisationId, b!.id)).toBe(false);
			expect(heard).toEqual([b!.id, b!.id]); // nothing announced for a board not the organisation's
		} finally {
			await listener.end();
		}
	});

	it('reads the stored content: snapshot and log together', async () => {
		const g = await createBoardFixture(t.db, { name: 'Content Works' });
		const boardId = g.boardIds[0];
		const doc = new Y.Doc();
		const points = doc.getMap('points');
		const updates: Uint8Array[] = [];
		doc.on('update', (u: Uint8Array) => updates.push(u));
		points.set('a', 1);
		points.set('b', 2);
		for (const u of updates.splice(0))
			await t.db
				.insertInto('board_update')
				.values({ board_id: boardId, update: Buffer.from(u), user_id: null })
				.execute();
		await compact(t.db, boardId);
		points.set('c', 3);
		points.delete('a');
		for (const u of updates.splice(0))
			await t.db
				.insertInto('board_update')
				.values({ board_id: boardId, update: Buffer.from(u), user_id: null })
				.execute();

		const stored = await boards.readContent(t.db, g.organisationId, boardId);
		const back = new Y.Doc();
		Y.applyUpdate(back, stored!);
		expect(back.getMap('points').toJSON()).toEqual({ b: 2, c: 3 });
		expect(await boards.readContent(t.db, other.organisationId, boardId)).toBeNull();
	});
});
