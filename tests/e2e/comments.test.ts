// The comment thread in a browser: a viewer writes on the survey page, picks a member to mention
// (the e-mail goes to that member), and the engineer replies; every control is at least 44 px
// tall for a gloved finger. The technician submits the survey from the same page.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { startTestMail } from '../helpers/mail';
import { openBrowser, signInPage, type Browser } from '../helpers/browser';
import { mkdirSync } from 'node:fs';
import { createBoardFixture, PASSWORD, type BoardFixture } from '../helpers/collab';

const SHOTS = process.env.SPOTFACE_SCREENSHOTS ?? 'test-results/review';

let t: TestDatabase;
let app: RunningApp;
let mail: Awaited<ReturnType<typeof startTestMail>>;
let f: BoardFixture;
let viewer: Browser;
let engineer: Browser;
let tech: Browser;

beforeAll(async () => {
	t = await createTestDatabase();
	mail = await startTestMail();
	app = await startApp({ databaseUrl: t.url, env: mail.env });
	f = await createBoardFixture(t.db, { boards: 1 });
	[viewer, engineer, tech] = await Promise.all([openBrowser(), openBrowser(), openBrowser({ width: 820, height: 1180, touch: true })]);
	await signInPage(viewer.page, app.url, f.people.viewer.email, PASSWORD);
	await signInPage(engineer.page, app.url, f.people.engineer.email, PASSWORD);
	await signInPage(tech.page, app.url, f.people.technician.email, PASSWORD);
}, 60_000);
afterAll(async () => {
	await Promise.all([viewer?.close(), engineer?.close(), tech?.close()]);
	await app?.stop();
	await mail?.close();
	await t?.drop();
});

describe('comments on the survey page', () => {
	it('a viewer comments and mentions the technician; the engineer replies', async () => {
		const page = viewer.page;
		await page.goto(`${app.url}/surveys/${f.surveyId}`);
		const thread = page.getByTestId('comment-thread');
		await thread.getByLabel('New comment').fill('Who has the permit for the pump pit? ');
		await thread.getByLabel('Mention a member').selectOption({ label: f.people.technician.name });
		await expect
			.poll(() => thread.getByLabel('New comment').inputValue())
			.toContain(`@[${f.people.technician.name}](${f.people.technician.userId})`);
		for (const control of [
			thread.getByRole('button', { name: 'Comment' }),
			thread.getByLabel('Mention a member'),
			thread.getByLabel('New comment')
		]) {
			expect((await control.boundingBox())!.height).toBeGreaterThanOrEqual(44);
		}
		await thread.getByRole('button', { name: 'Comment' }).click();
		await expect.poll(() => thread.getByTestId('comment').count()).toBe(1);
		await expect.poll(() => thread.getByTestId('comment').first().textContent()).toContain(`@${f.people.technician.name}`);
		const m = await mail.waitFor(f.people.technician.email, /mentioned you/);
		expect(m.text).toContain('Who has the permit for the pump pit?');

		const ep = engineer.page;
		await ep.goto(`${app.url}/surveys/${f.surveyId}`);
		const et = ep.getByTestId('comment-thread');
		const replyButton = et.getByRole('button', { name: 'Reply' });
		expect((await replyButton.boundingBox())!.height).toBeGreaterThanOrEqual(44);
		await replyButton.click();
		await et.getByLabel('Your reply').fill('Teo has it; it is on the board.');
		await et.getByRole('button', { name: 'Reply' }).click();
		await expect.poll(() => et.getByTestId('comment-reply').count()).toBe(1);
		expect(viewer.errors.concat(engineer.errors)).toEqual([]);
	});

	it('the technician submits with a note and sees the board is waiting for review', async () => {
		const page = tech.page;
		await page.goto(`${app.url}/surveys/${f.surveyId}`);
		await page.getByLabel(/Note for the engineer/).fill('All photos done; P2 is on the cowl, no better spot.');
		await page.getByRole('button', { name: 'Submit for review' }).click();
		await expect.poll(() => page.getByTestId('survey-history').textContent()).toContain('submitted it for review');
		await expect.poll(() => page.getByTestId('survey-left').textContent()).toContain('waiting for the engineer');
		const s = await t.db.selectFrom('survey').select('status').where('id', '=', f.surveyId).executeTakeFirstOrThrow();
		expect(s.status).toBe('submitted');
		mkdirSync(SHOTS, { recursive: true });
		await page.screenshot({ path: `${SHOTS}/survey-submitted-820.png`, fullPage: true });
		await engineer.page.goto(`${app.url}/surveys/${f.surveyId}`);
		await engineer.page.screenshot({ path: `${SHOTS}/survey-review-1180.png`, fullPage: true });
		expect(tech.errors).toEqual([]);
	});
});
