// The whole job with two people at once, through the pages only: an engineer on a 1280 px
// laptop signs up a new organisation (by its e-mail link) and invites a technician, who joins on
// an 820 × 1180 touch tablet; the engineer registers a pump with a bearing, a supply point and a
// photo and plans the survey; both walk the board together, each placing a point the other sees
// live; the technician submits; the engineer flags a point, the technician resolves it, the
// engineer approves and issues the job; the job pack downloads as a PDF; the technician records
// both points as installed on the tablet; the engineer closes the job and the survey closes.
// The main screens are saved under docs/screenshots/ for the README tour.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { startTestMail } from '../helpers/mail';
import { openBrowser, type Browser } from '../helpers/browser';
import { clickCanvas, openPoint, waitLive } from '../helpers/board-page';
import { scenarioPhoto } from '../helpers/board-scenario';
import { readBoardContent } from '../helpers/collab';
import {
	acceptInvitation,
	closeJobOnPage,
	fillRecord,
	invite,
	issueOneJobFromOverview,
	localDate,
	openDueJob,
	saveRecord,
	signUpByMail,
	surveyMove
} from '../helpers/job-steps';

const SHOTS = join(process.cwd(), 'docs', 'screenshots');

let t: TestDatabase;
let app: RunningApp;
let mail: Awaited<ReturnType<typeof startTestMail>>;
let engineer: Browser;
let tech: Browser;
let surveyUrl = '';
let boardUrl = '';
let boardId = '';
let jobUrl = '';

beforeAll(async () => {
	t = await createTestDatabase();
	mail = await startTestMail();
	app = await startApp({ databaseUrl: t.url, env: mail.env });
	engineer = await openBrowser({ width: 1280, height: 800 });
	tech = await openBrowser({ width: 820, height: 1180, touch: true });
	mkdirSync(SHOTS, { recursive: true });
});
afterAll(async () => {
	await engineer?.close();
	await tech?.close();
	await app?.stop();
	await mail?.close();
	await t?.drop();
});

/** Saves what the person sees (the viewport, not the whole page) as docs/screenshots/<name>-<desktop|tablet>.png. */
async function shot(b: Browser, name: string) {
	const width = b.page.viewportSize()!.width;
	await b.page.waitForLoadState('networkidle').catch(() => undefined);
	await b.page.evaluate(() => document.fonts.ready);
	const file = join(SHOTS, `${name}-${width >= 1000 ? 'desktop' : 'tablet'}.png`);
	await b.page.screenshot({ path: file });
	const png = readFileSync(file);
	expect(png.subarray(1, 4).toString('latin1')).toBe('PNG');
	expect(png.readUInt32BE(16)).toBe(width);
}

const surveyStatus = async () =>
	(await t.db.selectFrom('survey').select('status').where('title', '=', 'Clearwell pumps: sensor walk').executeTakeFirstOrThrow()).status;

describe('walkthrough: the whole job, two people at once', () => {
	it('the engineer signs up by e-mail link and invites a technician, who joins on the tablet', async () => {
		await signUpByMail(engineer.page, app.url, mail, {
			organisation: 'Tarnside Water (test)',
			name: 'Carys Penhallow',
			email: 'carys@tarnside.test',
			password: 'tarnside walk 2026'
		});
		await expect.poll(() => engineer.page.getByTestId('role-badge').textContent(), { timeout: 15_000 }).toContain('admin');
		await shot(engineer, '01-overview');
		await invite(engineer.page, app.url, 'jory@tarnside.test', 'technician');
		await acceptInvitation(tech.page, app.url, mail, { email: 'jory@tarnside.test', name: 'Jory Treloar', password: 'jory tablet pass 1' });
		await expect.poll(() => tech.page.getByTestId('role-badge').textContent(), { timeout: 15_000 }).toContain('technician');
		await shot(engineer, '02-members');
	});

	it('the engineer registers a site, an area, a 24 V supply point and a pump with a bearing and a photo', async () => {
		const p = engineer.page;
		await p.goto(`${app.url}/register`);
		await p.locator('form[action="?/create"]').getByLabel('Name').fill('Tarnside clearwell');
		await Promise.all([p.waitForURL(/\/register\/sites\/[0-9a-f-]{36}/), p.getByRole('button', { name: 'Add site' }).click()]);
		await p.locator('form[action="?/addArea"]').getByLabel('Area name').fill('Clearwell pump house');
		await p.getByRole('button', { name: 'Add area' }).click();
		await expect.poll(() => p.locator('form[action="?/addSupplyPoint"]').count(), { timeout: 15_000 }).toBe(1);
		const sp = p.locator('form[action="?/addSupplyPoint"]');
		await expect
			.poll(() => sp.getByLabel('Area').locator('option', { hasText: 'Clearwell pump house' }).count(), { timeout: 15_000 })
			.toBe(1);
		await sp.getByLabel('Area').selectOption({ label: 'Clearwell pump house' });
		await sp.getByLabel('Name').fill('Field junction box JB-C1');
		await sp.getByLabel('Tag (optional)').fill('JB-C1');
		await sp.getByRole('button', { name: 'Add supply point' }).click();
		await expect.poll(() => p.getByTestId('supply-point').count(), { timeout: 15_000 }).toBe(1);

		await p.goto(`${app.url}/register/machines/new`);
		await p.getByLabel('Name', { exact: true }).fill('Clearwell pump 1');
		await p.getByLabel('Tag (optional)').fill('CW-P01');
		await p.getByLabel('Kind').selectOption('pump');
		await p.getByLabel('Area', { exact: true }).selectOption({ label: 'Clearwell pump house' });
		await p.getByLabel('Nominal speed (r/min)').fill('1480');
		await p.getByLabel('Power (kW)').fill('55');
		await p.getByLabel('Foundation').selectOption('rigid');
		await Promise.all([
			p.waitForURL(/\/register\/machines\/[0-9a-f-]{36}\?created=1/),
			p.getByRole('button', { name: 'Register machine' }).click()
		]);
		await p.getByRole('button', { name: 'Add a bearing' }).click();
		const bearing = p.getByRole('form', { name: 'New bearing' });
		await bearing.getByLabel('Component').fill('pump');
		await bearing.getByLabel('Designation (optional)').fill('6311 size');
		await bearing.getByLabel('Rolling elements (count)').fill('8');
		await bearing.getByLabel('Rolling-element diameter d (mm)').fill('20.64');
		await bearing.getByLabel('Pitch diameter D (mm)').fill('85');
		await bearing.getByRole('button', { name: 'Add bearing' }).click();
		await expect.poll(() => p.getByTestId('bearing-row').count(), { timeout: 15_000 }).toBe(1);
		await p
			.getByTestId('file-input')
			.setInputFiles({ name: 'cw-p01-drive-end.jpg', mimeType: 'image/jpeg', buffer: await scenarioPhoto() });
		await expect.poll(() => p.getByTestId('media-thumb').count(), { timeout: 20_000 }).toBe(1);
		await expect
			.poll(() => p.getByTestId('machine-todo').textContent(), { timeout: 15_000 })
			.toContain('Everything the walk needs is recorded');
		// The page from its top, once the new thumbnail has loaded.
		await p.getByTestId('media-thumb').evaluate(async (img: HTMLImageElement) => {
			if (!img.complete) await new Promise((r) => img.addEventListener('load', r, { once: true }));
		});
		await p.evaluate(() => window.scrollTo(0, 0));
		await shot(engineer, '03-machine');
	});

	it('the engineer plans the survey with the technician, starts the walk and a board on the photo', async () => {
		const p = engineer.page;
		await p.goto(`${app.url}/surveys/new`);
		await p.getByLabel('Title').fill('Clearwell pumps: sensor walk');
		await p.getByLabel('Date of the site walk').fill(localDate(1));
		await p.getByLabel(/Clearwell pump 1/).check();
		await p.getByLabel(/Jory Treloar/).check();
		await Promise.all([p.waitForURL(/\/surveys\/[0-9a-f-]{36}$/), p.getByRole('button', { name: 'Plan the survey' }).click()]);
		surveyUrl = p.url();
		await surveyMove(p, surveyUrl, 'Start the site walk');
		await expect.poll(surveyStatus, { timeout: 15_000 }).toBe('walking');
		await p.goto(surveyUrl);
		await Promise.all([p.waitForURL(/\/boards\/[0-9a-f-]{36}$/), p.getByRole('button', { name: 'Start a board on it' }).click()]);
		boardUrl = p.url();
		boardId = boardUrl.split('/').pop()!;
		await p.goto(surveyUrl);
		await shot(engineer, '04-survey');
	});

	it('both walk the board together: each places a point and sees the other’s live', async () => {
		await engineer.page.goto(boardUrl);
		await tech.page.goto(boardUrl);
		await waitLive(engineer);
		await waitLive(tech);
		await expect
			.poll(() => engineer.page.getByTestId('peer').allTextContents(), { timeout: 10_000 })
			.toEqual([expect.stringContaining('Jory Treloar')]);

		// The technician marks the pump bearing housing.
		await tech.page.getByRole('button', { name: 'Point', exact: true }).click();
		await clickCanvas(tech, 0.38, 0.5);
		await expect.poll(() => tech.page.getByTestId('point-editor').locator('h2').textContent(), { timeout: 15_000 }).toBe('Point P1');
		await tech.page.getByTestId('point-surface').selectOption('machined_housing');
		await tech.page.getByTestId('point-mounting').selectOption('stud');
		await expect.poll(() => engineer.page.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 10_000 }).toBe('1');

		// The engineer marks the motor end, on what turns out to be the fan cowl.
		await engineer.page.getByRole('button', { name: 'Point', exact: true }).click();
		await clickCanvas(engineer, 0.68, 0.5);
		await expect.poll(() => engineer.page.getByTestId('point-editor').locator('h2').textContent(), { timeout: 15_000 }).toBe('Point P2');
		await engineer.page.getByTestId('point-surface').selectOption('sheet_cover');
		await engineer.page.getByTestId('point-mounting').selectOption('stud');
		await expect.poll(() => tech.page.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 10_000 }).toBe('2');
		await tech.page.getByRole('button', { name: 'Select', exact: true }).click();
		await engineer.page.getByRole('button', { name: 'Select', exact: true }).click();
		await waitLive(engineer);
		await waitLive(tech);
		await expect
			.poll(async () => (await readBoardContent(t.db, boardId)).points.map((p) => [p.label, p.surface, p.mounting]).sort())
			.toEqual([
				['P1', 'machined_housing', 'stud'],
				['P2', 'sheet_cover', 'stud']
			]);
		await shot(engineer, '05-board');
		await shot(tech, '05-board');
	});

	it('the technician submits; the engineer flags the cover point and asks for a change', async () => {
		await surveyMove(tech.page, surveyUrl, 'Submit for review', 'Two points; P2 is the only flat spot at the motor end.');
		await expect.poll(surveyStatus, { timeout: 15_000 }).toBe('submitted');
		await shot(tech, '06-submitted');

		await engineer.page.goto(boardUrl);
		await waitLive(engineer);
		await openPoint(engineer, 'P2');
		await engineer.page.getByTestId('flag-cover').click();
		await expect
			.poll(() => engineer.page.getByTestId('point-decision-reason').textContent(), { timeout: 15_000 })
			.toBe('On a sheet cover or guard');
		await openPoint(engineer, 'P1');
		await engineer.page.getByTestId('point-review').getByRole('button', { name: 'Approve' }).click();
		await expect
			.poll(async () => (await readBoardContent(t.db, boardId)).points.map((p) => [p.label, p.status]).sort())
			.toEqual([
				['P1', 'approved'],
				['P2', 'flagged']
			]);
		await openPoint(engineer, 'P2');
		await shot(engineer, '07-review');
		await surveyMove(engineer.page, surveyUrl, 'Request changes', 'P2 is on the fan cowl: put it on the motor drive-end housing.');
		await expect.poll(surveyStatus, { timeout: 15_000 }).toBe('changes_requested');
	});

	it('the technician resolves the flag on the tablet and submits again; the engineer approves', async () => {
		await tech.page.goto(boardUrl);
		await waitLive(tech);
		await openPoint(tech, 'P2');
		expect(await tech.page.getByTestId('point-decision-text').textContent()).toContain('Flagged');
		await tech.page.getByTestId('point-surface').selectOption('machined_housing');
		await expect
			.poll(async () => (await readBoardContent(t.db, boardId)).points.find((p) => p.label === 'P2')!.surface)
			.toBe('machined_housing');
		await waitLive(tech);
		await shot(tech, '08-resolve');
		await surveyMove(tech.page, surveyUrl, 'Submit for review', 'P2 moved onto the machined drive-end housing.');
		await expect.poll(surveyStatus, { timeout: 15_000 }).toBe('submitted');

		await engineer.page.goto(boardUrl);
		await waitLive(engineer);
		await openPoint(engineer, 'P2');
		await engineer.page.getByTestId('point-review').getByRole('button', { name: 'Approve' }).click();
		await expect
			.poll(async () => (await readBoardContent(t.db, boardId)).points.map((p) => p.status), { timeout: 15_000 })
			.toEqual(['approved', 'approved']);
		await surveyMove(engineer.page, surveyUrl, 'Approve the layout');
		await expect.poll(surveyStatus, { timeout: 15_000 }).toBe('approved');
	});

	it('the engineer issues the job to the technician and downloads the job pack', async () => {
		await issueOneJobFromOverview(engineer.page, app.url, /Clearwell pumps/, localDate(2), async () => {
			expect(await engineer.page.getByTestId('issue-points').locator('li').count()).toBe(2);
			// From the top of the page (filling the date scrolled it down), without the focus ring.
			await engineer.page.evaluate(() => {
				(document.activeElement as HTMLElement | null)?.blur();
				window.scrollTo(0, 0);
			});
			await shot(engineer, '09-issue-jobs');
		});
		await expect.poll(surveyStatus, { timeout: 15_000 }).toBe('jobs_issued');
		const job = await t.db.selectFrom('installation_job').select(['id', 'assignee_user_id']).executeTakeFirstOrThrow();
		const jory = await t.db.selectFrom('app_user').select('id').where('email', '=', 'jory@tarnside.test').executeTakeFirstOrThrow();
		expect(job.assignee_user_id).toBe(jory.id);
		jobUrl = `${app.url}/jobs/${job.id}`;

		await engineer.page.goto(jobUrl);
		const [download] = await Promise.all([
			engineer.page.waitForEvent('download'),
			engineer.page.getByTestId('job-pack-links').getByRole('link', { name: 'Job pack (A4)' }).click()
		]);
		expect(download.suggestedFilename()).toBe('J-0001-job-pack-A4.pdf');
		const pdf = readFileSync((await download.path())!);
		expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
		expect(pdf.length).toBeGreaterThan(10_000);
		await shot(engineer, '10-job');
	});

	it('the technician records both points as installed on the tablet', async () => {
		await tech.page.goto(app.url + '/');
		await expect.poll(() => tech.page.getByTestId('dashboard-due').textContent(), { timeout: 15_000 }).toContain('J-0001');
		await shot(tech, '11-overview');
		await openDueJob(tech.page, app.url, 'J-0001');
		const photo = { name: 'installed.jpg', mimeType: 'image/jpeg', buffer: await scenarioPhoto() };
		for (const label of ['P1', 'P2']) {
			const form = await fillRecord(tech.page, label, { torqueNm: '8', supplyV: '23.8', polarity: 'ok', photo });
			await expect.poll(() => form.getByTestId('record-findings').getAttribute('data-worst'), { timeout: 15_000 }).toBe('pass');
			if (label === 'P1') await shot(tech, '12-record');
			const point = await saveRecord(tech.page, label);
			await expect.poll(() => point.getByText('Recorded', { exact: true }).count(), { timeout: 15_000 }).toBe(1);
		}
		const recorded = await t.db.selectFrom('job_point').select(['recorded_at', 'worst', 'photo_media_id']).execute();
		expect(recorded.map((r) => [r.recorded_at !== null, r.worst, r.photo_media_id !== null])).toEqual([
			[true, 'pass', true],
			[true, 'pass', true]
		]);
	});

	it('the engineer closes the job; the survey closes with it', async () => {
		await closeJobOnPage(engineer.page, jobUrl);
		await expect.poll(surveyStatus, { timeout: 15_000 }).toBe('closed');
		await shot(engineer, '13-job-closed');
		await engineer.page.goto(surveyUrl);
		await shot(engineer, '14-survey-closed');
		await tech.page.goto(surveyUrl);
		await shot(tech, '14-survey-closed');
		const errors = [...engineer.errors, ...tech.errors].filter((e) => !/favicon/.test(e));
		expect(errors).toEqual([]);
	});
});
