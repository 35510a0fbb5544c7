// The board-access policy through the real socket: a submitted board is read-only for the
// technician and still writable for the engineer; a frozen board takes nothing from anyone.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { createBoardFixture, next, openProvider, sessionCookie, storedDoc, waitFor, type BoardFixture } from '../helpers/collab';
import { addPoint, maps, readBoard } from '../../src/lib/board/model';
import type { BoardProvider } from '../../src/lib/board/sync/provider';
import { transitionSurvey } from '../../src/lib/server/review/workflow';
import { freezeBoard } from '../../src/lib/server/boards/service';
import { REASON_FROZEN, REASON_SUBMITTED } from '../../src/lib/survey/board-access';

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
const cookies: Record<string, string> = {};
const open: BoardProvider[] = [];

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	f = await createBoardFixture(t.db, { boards: 2 });
	for (const role of ['engineer', 'technician'] as const) cookies[role] = await sessionCookie(app.url, f.people[role]);
});
afterAll(async () => {
	await Promise.all(open.map((p) => p.destroy()));
	await app?.stop();
	await t?.drop();
});

function provider(boardId: string, cookie: string) {
	const p = openProvider(app.url, boardId, cookie, { offline: false });
	open.push(p);
	return p;
}
const storedPoints = async (boardId: string) => readBoard(await storedDoc(t.db, boardId)).points.map((p) => p.label);

describe('board access while the survey is submitted', () => {
	it("refuses the technician's write and accepts the engineer's", async () => {
		const boardId = f.boardIds[0];
		const tech = provider(boardId, cookies.technician);
		const eng = provider(boardId, cookies.engineer);
		await Promise.all([tech.whenSynced(), eng.whenSynced()]);
		addPoint(tech.doc, { x: 10, y: 10, label: 'P1' });
		await waitFor(async () => (await storedPoints(boardId)).includes('P1'), 'the walking technician writes');

		const readonly = next(tech, 'readonly');
		await transitionSurvey(t.db, {
			organisationId: f.organisationId,
			surveyId: f.surveyId,
			name: 'submit',
			actor: { userId: f.people.technician.userId, role: 'technician' }
		});
		const [isReadOnly, why] = (await readonly) as [boolean, string];
		expect(isReadOnly).toBe(true);
		expect(why).toBe(REASON_SUBMITTED);

		const refused = next(tech, 'refused');
		addPoint(tech.doc, { x: 20, y: 20, label: 'P2' });
		expect(String((await refused)[0])).toMatch(/submitted for review/);
		expect(await storedPoints(boardId)).toEqual(['P1']);

		expect(eng.readOnly).toBe(false);
		const id = addPoint(eng.doc, { x: 30, y: 30, label: 'P3' });
		await waitFor(async () => (await storedPoints(boardId)).includes('P3'), "the engineer's point is stored");
		await waitFor(() => maps(tech.doc).points.has(id), 'the technician still sees live edits');

		// Changes requested: the technician writes again.
		const writable = next(tech, 'readonly');
		await transitionSurvey(t.db, {
			organisationId: f.organisationId,
			surveyId: f.surveyId,
			name: 'request_changes',
			actor: { userId: f.people.engineer.userId, role: 'engineer' },
			note: 'Add the motor NDE point'
		});
		expect((await writable)[0]).toBe(false);
		await tech.whenSynced();
		addPoint(tech.doc, { x: 40, y: 40, label: 'P4' });
		await waitFor(async () => (await storedPoints(boardId)).includes('P4'), 'the technician writes after changes are requested');
	});

	it('a frozen board refuses a write through the socket, even from the engineer', async () => {
		const boardId = f.boardIds[1];
		expect(await freezeBoard(t.db, f.organisationId, boardId)).toBe(true);
		const eng = provider(boardId, cookies.engineer);
		await eng.whenSynced();
		await waitFor(() => eng.readOnly, 'read-only on join');
		const before = await t.db.selectFrom('board_update').select('seq').where('board_id', '=', boardId).execute();
		const refused = next(eng, 'refused');
		addPoint(eng.doc, { x: 5, y: 5, label: 'P9' });
		expect(String((await refused)[0])).toBe(REASON_FROZEN);
		expect(await t.db.selectFrom('board_update').select('seq').where('board_id', '=', boardId).execute()).toHaveLength(before.length);
		expect(await storedPoints(boardId)).toEqual([]);
	});
});
