// Approval stores only what the board model accepts: a board holding content outside the model
// (an unknown part written before the board policy, say) cannot be approved until it is cleaned.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { createBoardFixture, PASSWORD, type BoardFixture } from '../helpers/collab';
import { addPoint, decidePoint } from '../../src/lib/board/model';

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
let engineer: Client;

async function storeBoard(doc: Y.Doc) {
	await t.db
		.updateTable('board')
		.set({ snapshot: Buffer.from(Y.encodeStateAsUpdate(doc)) })
		.where('id', '=', f.boardIds[0])
		.execute();
}

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	f = await createBoardFixture(t.db, { boards: 1 });
	await t.db.updateTable('survey').set({ status: 'submitted' }).where('id', '=', f.surveyId).execute();
	engineer = new Client(app.url);
	await engineer.signIn(f.people.engineer.email, PASSWORD);
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

describe('approval and the board policy', () => {
	it('refuses to approve a board with content outside the model, and approves it once clean', async () => {
		const doc = new Y.Doc();
		const id = addPoint(doc, { x: 10, y: 10, label: 'P1' });
		decidePoint(doc, id, 'approved', { userId: f.people.engineer.userId, name: f.people.engineer.name });
		const dirty = new Y.Doc();
		Y.applyUpdate(dirty, Y.encodeStateAsUpdate(doc));
		dirty.getText('stray').insert(0, 'written before the board policy');
		await storeBoard(dirty);

		const refused = await engineer.json('POST', `/api/v1/surveys/${f.surveyId}/transitions`, { transition: 'approve' });
		expect(refused.status).toBe(409);
		expect(((await refused.json()) as { detail: string }).detail).toMatch(/cannot be approved yet/);
		expect(await t.db.selectFrom('survey_revision').select('id').execute()).toEqual([]);
		expect((await t.db.selectFrom('survey').select('status').executeTakeFirstOrThrow()).status).toBe('submitted');

		await storeBoard(doc);
		const approved = await engineer.json('POST', `/api/v1/surveys/${f.surveyId}/transitions`, { transition: 'approve' });
		expect(approved.status, await approved.clone().text()).toBeLessThan(300);
		expect(await t.db.selectFrom('revision_point').select(['label', 'status']).execute()).toEqual([{ label: 'P1', status: 'approved' }]);
	});
});
