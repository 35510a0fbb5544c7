// Moving a survey through review over the API: every transition by every role from every status,
// allowed or refused, and the audit row each allowed move leaves (and no row for a refusal).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { createBoardFixture, PASSWORD, type BoardFixture } from '../helpers/collab';
import { SURVEY_STATUSES, TRANSITION_NAMES, TRANSITIONS, TRANSITION_ROLES } from '../../src/lib/survey/states';
import type { Role } from '../../src/lib/server/db/types';

let t: TestDatabase;
let app: RunningApp;
let f: BoardFixture;
let other: BoardFixture;
const clients = {} as Record<Role, Client>;
const ROLES: Role[] = ['admin', 'engineer', 'technician', 'viewer'];

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	f = await createBoardFixture(t.db, { boards: 1 });
	other = await createBoardFixture(t.db, { name: 'Elsewhere Water' });
	for (const role of ROLES) {
		clients[role] = new Client(app.url);
		await clients[role].signIn(f.people[role].email, PASSWORD);
	}
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

const rows = () => t.db.selectFrom('survey_transition').selectAll().where('survey_id', '=', f.surveyId).orderBy('id').execute();
const setStatus = (status: (typeof SURVEY_STATUSES)[number]) =>
	t.db.updateTable('survey').set({ status, archived_at: null }).where('id', '=', f.surveyId).execute();

describe('survey transitions over the API', () => {
	it('each transition by each role from each status: allowed with an audit row, or refused with none', async () => {
		let checked = 0;
		for (const status of SURVEY_STATUSES) {
			for (const name of TRANSITION_NAMES) {
				for (const role of ROLES) {
					await setStatus(status);
					await t.db.updateTable('board').set({ frozen_at: null }).where('survey_id', '=', f.surveyId).execute();
					const before = (await rows()).length;
					const res = await clients[role].json('POST', `/api/v1/surveys/${f.surveyId}/transitions`, {
						transition: name,
						note: `${role} ${name}`,
						confirmExceptions: true
					});
					const body = await res.json();
					const tr = TRANSITIONS[name];
					const roleOk = TRANSITION_ROLES[tr.action].includes(role);
					// Issuing jobs needs the jobs (the "Issue jobs" page): the bare move is refused with 409.
					const expected = !roleOk ? 403 : tr.from.includes(status) && name !== 'issue_jobs' ? 200 : 409;
					expect(res.status, `${name} by ${role} from ${status}: ${JSON.stringify(body)}`).toBe(expected);
					const after = await rows();
					const survey = await t.db.selectFrom('survey').select('status').where('id', '=', f.surveyId).executeTakeFirstOrThrow();
					if (expected === 200) {
						expect(body).toMatchObject({ from: status, to: tr.to });
						expect(after).toHaveLength(before + 1);
						expect(after.at(-1)).toMatchObject({
							transition: name,
							from_status: status,
							to_status: tr.to,
							actor_user_id: f.people[role].userId,
							actor_role: role,
							note: `${role} ${name}`
						});
						expect(survey.status).toBe(tr.to);
					} else {
						expect(res.headers.get('content-type')).toContain('application/problem+json');
						expect(body.detail).toBeTruthy();
						expect(after).toHaveLength(before);
						expect(survey.status).toBe(status);
					}
					checked++;
				}
			}
		}
		expect(checked).toBe(SURVEY_STATUSES.length * TRANSITION_NAMES.length * ROLES.length);
	});

	it('a required note, an archived survey, another organisation and bad input are refused clearly', async () => {
		await setStatus('submitted');
		let res = await clients.engineer.json('POST', `/api/v1/surveys/${f.surveyId}/transitions`, {
			transition: 'request_changes',
			note: '   '
		});
		expect(res.status).toBe(400);
		expect((await res.json()).detail).toBe('Say what needs changing.');
		res = await clients.engineer.json('POST', `/api/v1/surveys/${f.surveyId}/transitions`, { transition: 'teleport' });
		expect(res.status).toBe(400);
		expect((await res.json()).errors.transition).toBeTruthy();
		res = await clients.engineer.json('POST', `/api/v1/surveys/${other.surveyId}/transitions`, {
			transition: 'approve',
			confirmExceptions: true
		});
		expect(res.status).toBe(404);
		await t.db.updateTable('survey').set({ archived_at: new Date() }).where('id', '=', f.surveyId).execute();
		res = await clients.engineer.json('POST', `/api/v1/surveys/${f.surveyId}/transitions`, {
			transition: 'approve',
			confirmExceptions: true
		});
		expect(res.status).toBe(409);
		expect((await res.json()).detail).toMatch(/archived/);
		await setStatus('submitted');
	});

	it('the survey page offers the role’s moves, and the form action makes them', async () => {
		await setStatus('walking');
		const techPage = await (await clients.technician.get(`/surveys/${f.surveyId}`)).text();
		expect(techPage).toContain('Submit for review');
		expect(techPage).not.toContain('Approve the layout');
		const res = await clients.technician.form(`/surveys/${f.surveyId}?/transition`, { name: 'submit', note: 'Boards done' });
		expect(res.status).toBe(200);
		expect((await t.db.selectFrom('survey').select('status').where('id', '=', f.surveyId).executeTakeFirstOrThrow()).status).toBe(
			'submitted'
		);
		const engPage = await (await clients.engineer.get(`/surveys/${f.surveyId}`)).text();
		expect(engPage).toContain('Approve the layout');
		expect(engPage).toContain('Request changes');
		expect(engPage).toContain('Boards done');
		// While it is submitted the technician opens no new board; the engineer still could.
		const noBoard = await clients.technician.form(`/surveys/${f.surveyId}?/board`, { machineId: f.machineIds[0], mediaId: '' });
		expect(noBoard.status).toBe(409);
		expect(await noBoard.text()).toContain('submitted for review');
		// A technician's approval through the form is refused with the reason beside it.
		const refused = await clients.technician.form(`/surveys/${f.surveyId}?/transition`, { name: 'approve', confirm: '1' });
		expect(refused.status).toBe(403);
		const history = await (await clients.viewer.json('GET', `/api/v1/surveys/${f.surveyId}/transitions`)).json();
		expect(history.items.at(-1)).toMatchObject({
			transition: 'submit',
			from: 'walking',
			to: 'submitted',
			note: 'Boards done',
			actorRole: 'technician'
		});
	});

	it('approved revisions are readable as pages and through the API; other organisations get 404', async () => {
		// The matrix above approved twice (admin and engineer from submitted): revisions 1 and 2.
		const list = await (await clients.viewer.json('GET', `/api/v1/surveys/${f.surveyId}/revisions`)).json();
		expect(list.items.map((r: { number: number }) => r.number)).toEqual([1, 2]);
		expect(list.items.map((r: { approvedBy: string }) => r.approvedBy).sort()).toEqual(
			[f.people.admin.userId, f.people.engineer.userId].sort()
		);
		const page = await clients.viewer.get(`/surveys/${f.surveyId}/revisions/2`);
		expect(page.status).toBe(200);
		expect(await page.text()).toContain('Revision 2');
		const compare = await clients.technician.get(`/surveys/${f.surveyId}/revisions/compare?from=1&to=2`);
		expect(compare.status).toBe(200);
		expect(await compare.text()).toContain('data-testid="revision-diff"');
		const diff = await (await clients.technician.json('GET', `/api/v1/surveys/${f.surveyId}/revisions/compare?from=1&to=2`)).json();
		expect(diff).toMatchObject({ from: 1, to: 2, points: { added: [], removed: [], moved: [], changed: [] } });
		expect((await clients.viewer.json('GET', `/api/v1/surveys/${f.surveyId}/revisions/compare?from=1`)).status).toBe(400);
		expect((await clients.viewer.get(`/surveys/${f.surveyId}/revisions/9`)).status).toBe(404);
		expect((await clients.viewer.json('GET', `/api/v1/surveys/${f.surveyId}/revisions/abc`)).status).toBe(404);
		const outsider = new Client(app.url);
		await outsider.signIn(other.people.admin.email, PASSWORD);
		expect((await outsider.get(`/surveys/${f.surveyId}/revisions/1`)).status).toBe(404);
		expect((await outsider.json('GET', `/api/v1/surveys/${f.surveyId}/revisions/1`)).status).toBe(404);
	});

	it('archiving: engineers only, once; an archived survey moves no more', async () => {
		await setStatus('walking');
		expect((await clients.technician.json('POST', `/api/v1/surveys/${f.surveyId}/archive`)).status).toBe(403);
		expect((await clients.engineer.json('POST', `/api/v1/surveys/${other.surveyId}/archive`)).status).toBe(404);
		const res = await clients.engineer.json('POST', `/api/v1/surveys/${f.surveyId}/archive`);
		expect(res.status).toBe(200);
		expect((await clients.engineer.json('POST', `/api/v1/surveys/${f.surveyId}/archive`)).status).toBe(404);
		const audit = await t.db.selectFrom('audit_event').select(['action', 'actor_user_id']).where('subject_id', '=', f.surveyId).execute();
		expect(audit).toEqual([{ action: 'survey.archived', actor_user_id: f.people.engineer.userId }]);
		const moved = await clients.technician.json('POST', `/api/v1/surveys/${f.surveyId}/transitions`, { transition: 'submit' });
		expect(moved.status).toBe(409);
		const board = await (await clients.technician.get(`/surveys/${f.surveyId}/boards/${f.boardIds[0]}`)).text();
		expect(board).toMatch(/canEdit:false/);
		expect(board).toContain('This survey is archived; the board is read-only.');
	});
});
