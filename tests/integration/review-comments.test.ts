// Comments over the API: on the survey, a board, a point and a route; threads with replies; a
// viewer may comment; mentions send exactly one e-mail to the right address and show on the
// mentioned member's overview; other organisations and bad input are refused clearly.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { startTestMail } from '../helpers/mail';
import { Client } from '../helpers/http';
import { createBoardFixture, PASSWORD, type BoardFixture } from '../helpers/collab';
import { addPoint, addRoute } from '../../src/lib/board/model';
import { readCapturedMail } from '../../src/lib/server/mail/fake-smtp';
import type { Role } from '../../src/lib/server/db/types';

let t: TestDatabase;
let app: RunningApp;
let mail: Awaited<ReturnType<typeof startTestMail>>;
let f: BoardFixture;
let other: BoardFixture;
const c = {} as Record<Role, Client>;
let outsider: Client;
let pointId = '';
let routeId = '';

beforeAll(async () => {
	t = await createTestDatabase();
	mail = await startTestMail();
	app = await startApp({ databaseUrl: t.url, env: mail.env });
	f = await createBoardFixture(t.db, { boards: 1 });
	other = await createBoardFixture(t.db, { name: 'Elsewhere Water' });
	for (const role of ['admin', 'engineer', 'technician', 'viewer'] as Role[]) {
		c[role] = new Client(app.url);
		await c[role].signIn(f.people[role].email, PASSWORD);
	}
	outsider = new Client(app.url);
	await outsider.signIn(other.people.engineer.email, PASSWORD);
	const doc = new Y.Doc();
	pointId = addPoint(doc, { x: 100, y: 100, label: 'P1' }, 'seed');
	routeId = addRoute(
		doc,
		{
			pointId,
			vertices: [
				[100, 100],
				[300, 100]
			]
		},
		'seed'
	);
	await t.db
		.updateTable('board')
		.set({ snapshot: Buffer.from(Y.encodeStateAsUpdate(doc)) })
		.where('id', '=', f.boardIds[0])
		.execute();
});
afterAll(async () => {
	await app?.stop();
	await mail?.close();
	await t?.drop();
});

const url = () => `/api/v1/surveys/${f.surveyId}/comments`;
const mailsTo = (address: string) =>
	readCapturedMail(mail.dir).filter((m) => m.to.map((x) => x.toLowerCase()).includes(address.toLowerCase()));

describe('comments', () => {
	it('a viewer comments on the survey; the thread lists it with the author', async () => {
		const res = await c.viewer.json('POST', url(), { targetKind: 'survey', body: 'Is the blower hall in scope?' });
		expect(res.status).toBe(201);
		const made = await res.json();
		expect(made).toMatchObject({
			targetKind: 'survey',
			boardId: null,
			targetId: null,
			parentId: null,
			authorId: f.people.viewer.userId,
			authorName: 'Vic Viewer'
		});
		const list = await (await c.technician.json('GET', `${url()}?targetKind=survey`)).json();
		expect(list.items.map((x: { body: string }) => x.body)).toEqual(['Is the blower hall in scope?']);
	});

	it('comments on a board, a point and a route, with replies joining the thread', async () => {
		const boardId = f.boardIds[0];
		const onBoard = await (
			await c.technician.json('POST', url(), { targetKind: 'board', boardId, body: 'Photo taken from the walkway.' })
		).json();
		const onPoint = await c.engineer.json('POST', url(), {
			targetKind: 'point',
			boardId,
			targetId: pointId,
			body: 'Seat looks painted; scrape it.'
		});
		expect(onPoint.status).toBe(201);
		const point = await onPoint.json();
		const onRoute = await c.engineer.json('POST', url(), {
			targetKind: 'route',
			boardId,
			targetId: routeId,
			body: 'Clip it along the frame.'
		});
		expect(onRoute.status).toBe(201);
		const reply = await c.technician.json('POST', `/api/v1/comments/${point.id}/replies`, { body: 'Done, bare metal now.' });
		expect(reply.status).toBe(201);
		const r = await reply.json();
		expect(r).toMatchObject({ parentId: point.id, targetKind: 'point', targetId: pointId, boardId });
		// A reply to a reply joins the same thread.
		const r2 = await (await c.engineer.json('POST', `/api/v1/comments/${r.id}/replies`, { body: 'Thanks.' })).json();
		expect(r2.parentId).toBe(point.id);

		const points = await (await c.viewer.json('GET', `${url()}?boardId=${boardId}&targetKind=point&targetId=${pointId}`)).json();
		expect(points.items).toHaveLength(1);
		expect(points.items[0].replies.map((x: { body: string }) => x.body)).toEqual(['Done, bare metal now.', 'Thanks.']);
		const board = await (await c.viewer.json('GET', `${url()}?boardId=${boardId}`)).json();
		expect(board.items.map((x: { id: string }) => x.id).sort()).toEqual([onBoard.id, point.id, (await onRoute.json()).id].sort());
	});

	it('refuses a missing target, a point not on the board, an empty or long body, and another organisation', async () => {
		const boardId = f.boardIds[0];
		let res = await c.engineer.json('POST', url(), { targetKind: 'point', boardId, body: 'x' });
		expect(res.status).toBe(400);
		expect((await res.json()).errors.targetId).toBeTruthy();
		res = await c.engineer.json('POST', url(), { targetKind: 'point', boardId, targetId: 'nosuchpoint', body: 'x' });
		expect(res.status).toBe(404);
		expect((await res.json()).detail).toBe('No such point on this board.');
		res = await c.engineer.json('POST', url(), { targetKind: 'route', boardId, targetId: pointId, body: 'a point is not a route' });
		expect(res.status).toBe(404);
		res = await c.engineer.json('POST', url(), { targetKind: 'survey', body: '   ' });
		expect(res.status).toBe(400);
		res = await c.engineer.json('POST', url(), { targetKind: 'survey', body: 'x'.repeat(4001) });
		expect(res.status).toBe(400);
		expect((await res.json()).errors.body[0]).toMatch(/at most 4000/);
		res = await c.engineer.json('POST', url(), { targetKind: 'board', boardId: other.boardIds[0], body: 'x' });
		expect(res.status).toBe(404);
		res = await outsider.json('POST', url(), { targetKind: 'survey', body: 'hello' });
		expect(res.status).toBe(404);
		expect((await outsider.json('GET', url())).status).toBe(404);
		expect((await new Client(app.url).json('POST', url(), { body: 'anon' })).status).toBe(401);
		expect(await t.db.selectFrom('comment').select('id').where('body', 'in', ['hello', 'anon', 'x']).execute()).toHaveLength(0);
	});

	it('a mention sends exactly one e-mail to the right address and shows on the overview', async () => {
		const tech = f.people.technician;
		const outsiderPerson = other.people.technician;
		const body = `@[${tech.name}](${tech.userId}) please check P1, and @[${tech.name}](${tech.userId}) again; also @${outsiderPerson.email}`;
		const res = await c.engineer.json('POST', url(), { targetKind: 'point', boardId: f.boardIds[0], targetId: pointId, body });
		expect(res.status).toBe(201);
		const made = await res.json();
		const m = await mail.waitFor(tech.email, /mentioned you/);
		expect(m.subject).toBe('Esme Engineer mentioned you on “Pump house walk”');
		expect(m.text).toContain('@Teo Technician please check P1');
		expect(m.text).toContain(`/surveys/${f.surveyId}/boards/${f.boardIds[0]}`);
		expect(mailsTo(tech.email)).toHaveLength(1);
		// The member of another organisation is not told; the author is never told.
		expect(await t.db.selectFrom('mail_outbox').select('id').where('to_address', '=', outsiderPerson.email).execute()).toHaveLength(0);
		expect(await t.db.selectFrom('comment_mention').select(['user_id']).where('comment_id', '=', made.id).execute()).toEqual([
			{ user_id: tech.userId }
		]);

		// Editing the comment does not tell the same person again; a new mention (by e-mail) is told once.
		const edit = await c.engineer.json('PATCH', `/api/v1/comments/${made.id}`, {
			body: `${body} cc @${f.people.viewer.email.toUpperCase()}`
		});
		expect(edit.status).toBe(200);
		expect((await edit.json()).editedAt).not.toBeNull();
		await mail.waitFor(f.people.viewer.email, /mentioned you/);
		expect(mailsTo(tech.email)).toHaveLength(1);
		expect(await t.db.selectFrom('mail_outbox').select('id').where('to_address', '=', tech.email).execute()).toHaveLength(1);
		expect(await t.db.selectFrom('mail_outbox').select('id').where('to_address', '=', f.people.viewer.email).execute()).toHaveLength(1);
		// Only the author edits.
		expect((await c.technician.json('PATCH', `/api/v1/comments/${made.id}`, { body: 'mine now' })).status).toBe(403);

		const overview = await (await c.technician.get('/')).text();
		expect(overview).toContain('data-testid="mention"');
		expect(overview).toContain('Esme Engineer on “Pump house walk”');
		expect(await (await c.admin.get('/')).text()).not.toContain('data-testid="mention"');
	});

	it('the survey page shows the survey’s comments with the thread component', async () => {
		const html = await (await c.viewer.get(`/surveys/${f.surveyId}`)).text();
		expect(html).toContain('data-testid="comment-thread"');
		expect(html).toContain('Is the blower hall in scope?');
		expect(html).not.toContain('Seat looks painted');
	});
});
