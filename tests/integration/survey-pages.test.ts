// Survey planning and board pages over HTTP: validation beside the fields, roles, tenancy, the
// "what is left" lines, upload-and-open, and the board page's read-only state.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { jpeg } from '../helpers/images';
import { created, makeOrg, siteWithMachine } from '../helpers/register';

let t: TestDatabase;
let app: RunningApp;
let a: Awaited<ReturnType<typeof makeOrg>>;
let b: Awaited<ReturnType<typeof makeOrg>>;
let siteA: { id: string };
let machineA: { id: string };
let machineB: { id: string };
let otherSiteMachineA: { id: string };

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	a = await makeOrg(t, app.url, 'Alder Water');
	b = await makeOrg(t, app.url, 'Birch Pumping');
	const ra = await siteWithMachine(a.clients.admin);
	siteA = ra.site;
	machineA = ra.machine;
	otherSiteMachineA = (await siteWithMachine(a.clients.admin, ' two')).machine;
	machineB = (await siteWithMachine(b.clients.admin)).machine;
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

function post(c: Client, path: string, fields: Array<[string, string]>) {
	return c.request(path, {
		method: 'POST',
		headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
		body: new URLSearchParams(fields).toString()
	});
}

const plan = (overrides: Record<string, string | string[]> = {}): Array<[string, string]> => {
	const base: Record<string, string | string[]> = {
		siteId: siteA.id,
		title: 'Pump hall walk',
		plannedDate: '2026-05-04',
		notes: '',
		machineId: [machineA.id],
		engineerId: a.userIds.engineer,
		technicianId: [a.userIds.technician],
		...overrides
	};
	return Object.entries(base).flatMap(([k, v]) =>
		Array.isArray(v) ? v.map((x) => [k, x] as [string, string]) : [[k, v] as [string, string]]
	);
};

let surveyId = '';

describe('planning a survey', () => {
	it('only planners see the form', async () => {
		expect((await a.clients.technician.get('/surveys/new')).status).toBe(403);
		expect((await post(a.clients.technician, '/surveys/new', plan())).status).toBe(403);
		expect((await a.clients.engineer.get('/surveys/new')).status).toBe(200);
	});

	it('a missing title is shown beside the field and what was typed is kept', async () => {
		const res = await post(a.clients.engineer, '/surveys/new', plan({ title: '', notes: 'bring the ladder' }));
		expect(res.status).toBe(400);
		const html = await res.text();
		expect(html).toContain('data-field-error="title"');
		expect(html).toContain('Give the survey a title');
		expect(html).toContain('bring the ladder');
		expect(await t.db.selectFrom('survey').select('id').execute()).toHaveLength(0);
	});

	it('refuses a technician as the engineer, a bad date, and a machine of another site or organisation', async () => {
		let res = await post(a.clients.engineer, '/surveys/new', plan({ engineerId: a.userIds.technician, technicianId: [] }));
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('Choose an engineer of your organisation');
		res = await post(a.clients.engineer, '/surveys/new', plan({ plannedDate: '2026-13-45' }));
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('YYYY-MM-DD');
		res = await post(a.clients.engineer, '/surveys/new', plan({ machineId: [otherSiteMachineA.id] }));
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('machine of the survey’s site');
		res = await post(a.clients.engineer, '/surveys/new', plan({ machineId: [machineB.id] }));
		expect(res.status).toBe(400);
		// Another organisation's people are not assignable, and its site is not offered.
		res = await post(b.clients.engineer, '/surveys/new', plan({ machineId: [machineB.id] }));
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('Choose an engineer of your organisation');
		res = await post(
			b.clients.engineer,
			'/surveys/new',
			plan({ machineId: [machineB.id], engineerId: b.userIds.engineer, technicianId: [b.userIds.technician] })
		);
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('Choose one of your organisation’s live sites');
		expect(await t.db.selectFrom('survey').select('id').execute()).toHaveLength(0);
	});

	it('a valid plan stores the survey, its machine and both assignees', async () => {
		const res = await post(a.clients.engineer, '/surveys/new', plan());
		expect(res.status).toBe(303);
		surveyId = res.headers.get('location')!.split('/').pop()!;
		const s = await t.db.selectFrom('survey').selectAll().where('id', '=', surveyId).executeTakeFirstOrThrow();
		expect(s).toMatchObject({ organisation_id: a.id, site_id: siteA.id, title: 'Pump hall walk', status: 'planned' });
		const people = await t.db
			.selectFrom('survey_assignee')
			.select(['user_id', 'role'])
			.where('survey_id', '=', surveyId)
			.orderBy('role')
			.execute();
		expect(people).toEqual([
			{ user_id: a.userIds.engineer, role: 'engineer' },
			{ user_id: a.userIds.technician, role: 'technician' }
		]);
	});

	it('the list says what is left; another organisation sees none of it', async () => {
		const html = await (await a.clients.viewer.get('/surveys')).text();
		expect(html).toContain('Pump hall walk');
		expect(html).toContain('1 of 1 machine has no board yet');
		const mine = await (await a.clients.technician.get('/surveys?show=mine')).text();
		expect(mine).toContain('assigned to you');
		expect(await (await b.clients.admin.get('/surveys')).text()).not.toContain('Pump hall walk');
		expect((await b.clients.admin.get(`/surveys/${surveyId}`)).status).toBe(404);
	});
});

describe('photos and boards', () => {
	let mediaId = '';
	let boardPath = '';

	it('the survey page asks for a photo first', async () => {
		const html = await (await a.clients.technician.get(`/surveys/${surveyId}`)).text();
		expect(html).toContain('take a photo or add a drawing, then open its board');
	});

	it('a viewer cannot upload or open a board', async () => {
		const form = new FormData();
		form.set('machineId', machineA.id);
		form.set('kind', 'photo');
		form.set('open', '1');
		form.set('file', new Blob([new Uint8Array(await jpeg(640, 480))], { type: 'image/jpeg' }), 'pump.jpg');
		expect(
			(await a.clients.viewer.request(`/surveys/${surveyId}?/upload`, { method: 'POST', body: form, headers: { accept: 'text/html' } }))
				.status
		).toBe(403);
		expect((await a.clients.viewer.form(`/surveys/${surveyId}?/board`, { machineId: machineA.id, mediaId: '' })).status).toBe(403);
	});

	it('a technician takes a photo and lands on its new board', async () => {
		const empty = new FormData();
		empty.set('machineId', machineA.id);
		empty.set('kind', 'photo');
		empty.set('file', new Blob([], { type: 'image/jpeg' }), 'nothing.jpg');
		const none = await a.clients.technician.request(`/surveys/${surveyId}?/upload`, {
			method: 'POST',
			body: empty,
			headers: { accept: 'text/html' }
		});
		expect(none.status).toBe(400);
		expect(await none.text()).toContain('Choose or take a photo first');

		const form = new FormData();
		form.set('machineId', machineA.id);
		form.set('kind', 'photo');
		form.set('caption', 'Drive end');
		form.set('open', '1');
		form.set('file', new Blob([new Uint8Array(await jpeg(640, 480))], { type: 'image/jpeg' }), 'pump.jpg');
		const res = await a.clients.technician.request(`/surveys/${surveyId}?/upload`, {
			method: 'POST',
			body: form,
			headers: { accept: 'text/html' }
		});
		expect(res.status).toBe(303);
		boardPath = res.headers.get('location')!;
		expect(boardPath).toMatch(new RegExp(`^/surveys/${surveyId}/boards/[0-9a-f-]{36}$`));
		const board = await t.db.selectFrom('board').selectAll().executeTakeFirstOrThrow();
		mediaId = board.media_id!;
		expect(board).toMatchObject({ organisation_id: a.id, survey_id: surveyId, machine_id: machineA.id, title: 'Drive end' });
		const html = await (await a.clients.technician.get(`/surveys/${surveyId}`)).text();
		expect(html).toContain(`/surveys/${surveyId}/boards/${board.id}`);
	});

	it('a board on a photo of another machine is refused', async () => {
		const other = await created<{ id: string }>(
			(async () => {
				const f = new FormData();
				f.set('file', new Blob([new Uint8Array(await jpeg(320, 240))], { type: 'image/jpeg' }), 'x.jpg');
				return a.clients.admin.request(`/api/v1/machines/${otherSiteMachineA.id}/media`, { method: 'POST', body: f });
			})()
		);
		const res = await a.clients.engineer.form(`/surveys/${surveyId}?/board`, { machineId: machineA.id, mediaId: other.id });
		expect(res.status).toBe(409);
		expect(await res.text()).toContain('must be one of this machine’s');
	});

	it('the board page carries the machine, the photo, the supply points and who may edit', async () => {
		const tech = await a.clients.technician.get(boardPath);
		expect(tech.status).toBe(200);
		const html = await tech.text();
		expect(html).toContain('Raw water pump');
		expect(html).toContain(`/api/v1/media/${mediaId}/display`);
		expect(html).toMatch(/canEdit:true/);
		expect(await (await a.clients.viewer.get(boardPath)).text()).toMatch(/canEdit:false/);
		expect(await (await a.clients.engineer.get(boardPath)).text()).toMatch(/canDecide:true/);
	});

	it('another organisation, or the board under another survey, is a 404', async () => {
		expect((await b.clients.admin.get(boardPath)).status).toBe(404);
		const boardId = boardPath.split('/').pop();
		const wrongSurvey = await post(a.clients.engineer, '/surveys/new', plan({ title: 'Second walk' }));
		const secondId = wrongSurvey.headers.get('location')!.split('/').pop();
		expect((await a.clients.technician.get(`/surveys/${secondId}/boards/${boardId}`)).status).toBe(404);
	});

	it('once the survey is approved the board is read-only for everyone', async () => {
		await t.db.updateTable('survey').set({ status: 'approved' }).where('id', '=', surveyId).execute();
		const html = await (await a.clients.technician.get(boardPath)).text();
		expect(html).toMatch(/canEdit:false/);
		expect(html).toMatch(/frozen:true/);
		const res = await a.clients.engineer.form(`/surveys/${surveyId}?/board`, { machineId: machineA.id, mediaId });
		expect(res.status).toBe(409);
	});
});
