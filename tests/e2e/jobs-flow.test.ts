// Installation jobs in two browsers: the engineer issues the jobs of an approved survey; the
// technician, on an 820 × 1180 tablet, records two points, the second with no signal (kept on
// the tablet and sent when it is back online); the findings show as values are typed; the
// engineer cannot close the job while a point fails without saying why, then closes it.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { openBrowser, signInPage, type Browser } from '../helpers/browser';
import { SCENARIO_PASSWORD, scenarioPhoto, setUpBoardScenario } from '../helpers/board-scenario';
import { readDocument } from '../../src/lib/server/collab/persistence';
import { addPoint, addRoute, decidePoint } from '../../src/lib/board/model';
import { closeJobOnPage, fillRecord, issueOneJobFromOverview, localDate, saveRecord } from '../helpers/job-steps';
import { Client } from '../helpers/http';
import { hashPassword } from '../../src/lib/server/auth/password';

let t: TestDatabase;
let app: RunningApp;
let engineer: Browser;
let tech: Browser;
let surveyId = '';
let jobId = '';

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	const s = await setUpBoardScenario(t, app.url);
	surveyId = s.surveyPath.split('/').pop()!;
	const move = async (transition: string) => {
		const r = await s.engineer.json('POST', `/api/v1/surveys/${surveyId}/transitions`, { transition });
		expect(r.status, await r.clone().text()).toBeLessThan(300);
	};
	await move('start');
	// The walk's result, written as the live board stores it: P1 a stud in cast iron with its
	// cable route, P2 a bonded pad; both approved by the engineer.
	const doc = new Y.Doc();
	const stored = await readDocument(t.db, s.boardId);
	if (stored) Y.applyUpdate(doc, stored);
	const sv = Y.encodeStateVector(doc);
	const by = { userId: 'u-eng', name: 'Esme Engineer' };
	const p1 = addPoint(doc, {
		x: 460,
		y: 330,
		createdBy: 'u-tech',
		component: 'Pump drive-end bearing housing',
		direction: 'radial_h',
		surface: 'machined_housing',
		mounting: 'stud',
		material: 'cast_iron',
		flatDiameterMm: 40,
		wallThicknessMm: 22,
		distanceToBearingMm: 20
	});
	addRoute(doc, {
		pointId: p1,
		supplyPointId: null,
		exitLabel: 'Junction box JB-3',
		vertices: [
			[460, 330],
			[460, 150],
			[1100, 150]
		],
		lengthEnteredM: 12,
		crossSectionMm2: 0.75,
		fixings: 'clips'
	});
	const p2 = addPoint(doc, {
		x: 820,
		y: 400,
		createdBy: 'u-tech',
		component: 'Motor drive-end bearing housing',
		direction: 'radial_v',
		surface: 'cast_housing',
		mounting: 'bonded_pad',
		flatDiameterMm: 32,
		distanceToBearingMm: 30
	});
	decidePoint(doc, p1, 'approved', by);
	decidePoint(doc, p2, 'approved', by);
	await t.db
		.insertInto('board_update')
		.values({ board_id: s.boardId, update: Buffer.from(Y.encodeStateAsUpdate(doc, sv)), user_id: 'u-eng' })
		.execute();
	await move('submit');
	await move('approve');

	engineer = await openBrowser({ width: 1280, height: 800 });
	tech = await openBrowser({ width: 820, height: 1180, touch: true });
	await signInPage(engineer.page, app.url, 'engineer@fenwick.test', SCENARIO_PASSWORD);
	await signInPage(tech.page, app.url, 'tech@fenwick.test', SCENARIO_PASSWORD);
});

afterAll(async () => {
	await engineer?.close();
	await tech?.close();
	await app?.stop();
	await t?.drop();
});

const status = async () => (await t.db.selectFrom('survey').select('status').where('id', '=', surveyId).executeTakeFirstOrThrow()).status;
const jobPoint = (label: string) =>
	t.db
		.selectFrom('job_point as jp')
		.innerJoin('revision_point as rp', (j) =>
			j.onRef('rp.revision_board_id', '=', 'jp.revision_board_id').onRef('rp.point_id', '=', 'jp.point_id')
		)
		.select([
			'jp.recorded_at',
			'jp.worst',
			'jp.torque_nm',
			'jp.supply_v',
			'jp.polarity_ok',
			'jp.photo_media_id',
			'jp.ready_at',
			'jp.baseline_start_at'
		])
		.where('rp.label', '=', label)
		.executeTakeFirstOrThrow();

describe('installation jobs', () => {
	it('the overview sends the engineer to issue the jobs; the engineer issues one job for the pump', async () => {
		await issueOneJobFromOverview(engineer.page, app.url, /Pump hall spring walk/, localDate(3), async () => {
			expect(await engineer.page.getByTestId('issue-points').locator('li').count()).toBe(2);
		});
		expect(engineer.page.url()).toMatch(new RegExp(`/surveys/${surveyId}\\?jobs=issued$`));
		await expect.poll(status).toBe('jobs_issued');
		const job = await t.db.selectFrom('installation_job').select(['id', 'assignee_user_id', 'lockout_required']).executeTakeFirstOrThrow();
		jobId = job.id;
		expect(job).toMatchObject({ assignee_user_id: 'u-tech', lockout_required: true });
		const mail = await t.db.selectFrom('mail_outbox').select(['to_address', 'subject']).where('purpose', '=', 'job-assigned').execute();
		expect(mail).toEqual([{ to_address: 'tech@fenwick.test', subject: expect.stringMatching(/^Installation job J-0001/) }]);
		expect(await engineer.page.getByTestId('survey-jobs').textContent()).toContain('J-0001');
	});

	it('the technician records P1 on the tablet; findings show at once as values are typed', async () => {
		await tech.page.goto(app.url + '/');
		await Promise.all([
			tech.page.waitForURL(new RegExp(`/jobs/${jobId}$`)),
			tech.page
				.getByTestId('dashboard-due')
				.getByRole('link', { name: /J-0001/ })
				.click()
		]);
		const p1 = tech.page.locator('[data-testid="job-point"][data-label="P1"]');
		const form = p1.getByTestId('record-form');
		await form.getByLabel('Torque applied (N·m)').fill('12');
		await expect.poll(() => form.getByTestId('record-findings').getAttribute('data-worst')).toBe('fail');
		expect(await form.getByTestId('record-findings').textContent()).toContain('above the 10 N·m limit');
		await fillRecord(tech.page, 'P1', {
			torqueNm: '8',
			supplyV: '23.9',
			polarity: 'ok',
			photo: { name: 'p1.jpg', mimeType: 'image/jpeg', buffer: await scenarioPhoto() }
		});
		await expect.poll(() => form.getByTestId('record-findings').getAttribute('data-worst')).toBe('pass');
		await saveRecord(tech.page, 'P1');
		await expect.poll(async () => (await jobPoint('P1')).recorded_at, { timeout: 15_000 }).not.toBeNull();
		// The page shows it stored (the form reloads with the record) before the tablet loses signal.
		await expect.poll(() => p1.getByText('Recorded', { exact: true }).count(), { timeout: 15_000 }).toBe(1);
		const stored = await jobPoint('P1');
		expect(stored).toMatchObject({ worst: 'pass', torque_nm: 8, supply_v: 23.9, polarity_ok: true });
		expect(stored.photo_media_id).not.toBeNull();
		expect(stored.ready_at).not.toBeNull();
	});

	it('P2 is recorded with no signal: kept on the tablet, sent when it is back online', async () => {
		const p2 = tech.page.locator('[data-testid="job-point"][data-label="P2"]');
		await tech.context.setOffline(true);
		await expect.poll(() => tech.page.getByTestId('offline-banner').count()).toBe(1);
		const form = p2.getByTestId('record-form');
		await form.getByLabel('Supply voltage at the sensor (V)').fill('24.2');
		await form.getByLabel('Polarity measured').selectOption('reversed');
		await expect.poll(() => form.getByTestId('record-findings').getAttribute('data-worst')).toBe('fail');
		await form.getByRole('button', { name: 'Now' }).first().click();
		await form.getByRole('button', { name: 'Now' }).nth(1).click();
		await form.getByRole('button', { name: 'Save the record of P2' }).click();
		await expect.poll(() => tech.page.getByTestId('waiting-records').count()).toBe(1);
		expect(await p2.getByTestId('record-status').textContent()).toContain('Saved on this device');
		expect((await jobPoint('P2')).recorded_at).toBeNull();

		await tech.context.setOffline(false);
		await expect.poll(async () => (await jobPoint('P2')).recorded_at, { timeout: 20_000 }).not.toBeNull();
		expect(await jobPoint('P2')).toMatchObject({ worst: 'fail', polarity_ok: false, supply_v: 24.2 });
		await expect.poll(() => tech.page.getByTestId('waiting-records').count()).toBe(0);
	});

	it('the engineer cannot close while P2 fails without a reason, then closes with one; the survey closes', async () => {
		await engineer.page.goto(`${app.url}/jobs/${jobId}`);
		expect(await engineer.page.getByTestId('close-blockers').textContent()).toContain('P2');
		await engineer.page.getByRole('button', { name: 'Close the job' }).click();
		await expect.poll(() => engineer.page.locator('[data-field-error="note"]').count()).toBe(1);
		expect(await engineer.page.locator('[data-field-error="note"]').textContent()).toMatch(/P2: Polarity wrong/);
		expect((await t.db.selectFrom('installation_job').select('status').executeTakeFirstOrThrow()).status).toBe('issued');

		await closeJobOnPage(engineer.page, `${app.url}/jobs/${jobId}`, 'P2 rewired and checked by the site electrician; record follows.');
		await expect.poll(status).toBe('closed');

		// The job pack downloads as an attachment, on Letter too.
		const pack = await engineer.page.request.get(`${app.url}/jobs/${jobId}/pack?paper=Letter`);
		expect(pack.status()).toBe(200);
		expect(pack.headers()['content-type']).toBe('application/pdf');
		expect(pack.headers()['content-disposition']).toBe('attachment; filename="J-0001-job-pack-Letter.pdf"');
		expect((await pack.body()).subarray(0, 5).toString('latin1')).toBe('%PDF-');
		expect((await engineer.page.request.get(`${app.url}/jobs/${jobId}/pack?paper=A3`)).status()).toBe(400);
		expect(engineer.errors).toEqual([]);
		expect(tech.errors.filter((e) => !/Failed to fetch|ERR_INTERNET_DISCONNECTED|net::/.test(e))).toEqual([]);
	});

	it('another organisation gets 404 for the job, its pack, its export and its record; a viewer cannot record', async () => {
		const hash = await hashPassword(SCENARIO_PASSWORD);
		const other = await t.db.insertInto('organisation').values({ name: 'Other Water (test)' }).returning('id').executeTakeFirstOrThrow();
		await t.db
			.insertInto('app_user')
			.values({ id: 'u-other', email: 'eng@other.test', name: 'Other Engineer', password_hash: hash })
			.execute();
		await t.db.insertInto('member').values({ organisation_id: other.id, user_id: 'u-other', role: 'engineer' }).execute();
		const stranger = new Client(app.url);
		await stranger.signIn('eng@other.test', SCENARIO_PASSWORD);
		const point = await t.db.selectFrom('job_point').select('id').executeTakeFirstOrThrow();
		expect((await stranger.request(`/jobs/${jobId}`)).status).toBe(404);
		expect((await stranger.request(`/jobs/${jobId}/pack?paper=A4`)).status).toBe(404);
		expect((await stranger.request(`/jobs/export?format=json&job=${jobId}`)).status).toBe(404);
		const all = await (await stranger.request('/jobs/export?format=json')).json();
		expect(all.jobs).toEqual([]);
		const rec = await stranger.json('POST', `/api/v1/jobs/${jobId}/points/${point.id}/record`, { mounting: 'stud', supplyV: 24 });
		expect(rec.status).toBe(404);
		expect((await stranger.request('/jobs/export?format=csv&job=not-an-id')).status).toBe(400);

		await t.db
			.insertInto('app_user')
			.values({ id: 'u-view', email: 'viewer@fenwick.test', name: 'Vic Viewer', password_hash: hash })
			.execute();
		const org = await t.db.selectFrom('member').select('organisation_id').where('user_id', '=', 'u-eng').executeTakeFirstOrThrow();
		await t.db.insertInto('member').values({ organisation_id: org.organisation_id, user_id: 'u-view', role: 'viewer' }).execute();
		const viewer = new Client(app.url);
		await viewer.signIn('viewer@fenwick.test', SCENARIO_PASSWORD);
		expect((await viewer.json('POST', `/api/v1/jobs/${jobId}/points/${point.id}/record`, { mounting: 'stud' })).status).toBe(403);
		expect((await viewer.request(`/jobs/${jobId}/pack?paper=A4`)).status).toBe(200);
		const csv = await viewer.request(`/jobs/export?format=csv&what=points&job=${jobId}`);
		expect(csv.headers.get('content-disposition')).toBe('attachment; filename="J-0001-points.csv"');
		expect((await csv.text()).split('\r\n').filter(Boolean)).toHaveLength(3); // header + P1 + P2
	});
});
