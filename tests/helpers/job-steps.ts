// Steps through the pages that browser tests share: signing up an organisation by its e-mail
// link, inviting a member and accepting, moving a survey from its page, issuing jobs from the
// overview, recording a point as installed and closing a job.
import { expect } from 'vitest';
import type { Page } from 'playwright-core';
import type { startTestMail } from './mail';

type Mail = Awaited<ReturnType<typeof startTestMail>>;

/** Signs up an organisation and finishes through the mailed link; the page ends signed in on the overview. */
export async function signUpByMail(
	page: Page,
	base: string,
	mail: Mail,
	who: { organisation: string; name: string; email: string; password: string }
) {
	await page.goto(`${base}/sign-up`);
	await page.getByLabel('Organisation').fill(who.organisation);
	await page.getByLabel('Your name').fill(who.name);
	await page.getByLabel('E-mail').fill(who.email);
	await page.getByLabel('Password').fill(who.password);
	await page.getByRole('button', { name: 'Create organisation' }).click();
	await expect.poll(() => page.getByText('Check your e-mail').count(), { timeout: 15_000 }).toBe(1);
	const link = mail.linkIn(await mail.waitFor(who.email, /Finish creating/), '/sign-up/confirm/');
	await page.goto(link);
	await page.getByRole('button', { name: 'Create organisation and sign in' }).click();
	await page.waitForURL(`${base}/?welcome=1`);
}

/** Sends an invitation from the members page. */
export async function invite(page: Page, base: string, email: string, role: 'admin' | 'engineer' | 'technician' | 'viewer') {
	await page.goto(`${base}/settings/members`);
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Role', { exact: true }).selectOption(role);
	await page.getByRole('button', { name: 'Send invitation' }).click();
	await expect.poll(() => page.getByText(`Invitation sent to ${email}`).count(), { timeout: 15_000 }).toBe(1);
}

/** Opens the mailed invitation and joins with a new account; the page ends signed in. */
export async function acceptInvitation(page: Page, base: string, mail: Mail, who: { email: string; name: string; password: string }) {
	const link = mail.linkIn(await mail.waitFor(who.email, /invited/), '/invite/');
	await page.goto(link);
	await page.getByLabel('Your name').fill(who.name);
	await page.getByLabel('Choose a password').fill(who.password);
	await page.getByRole('button', { name: 'Accept and join' }).click();
	await page.waitForURL(`${base}/?joined=1`);
}

/** Makes a move (submit, request changes, approve …) with the survey page's button, with a note if given. */
export async function surveyMove(page: Page, surveyUrl: string, label: string, note?: string) {
	await page.goto(surveyUrl);
	const form = page
		.getByTestId('survey-actions')
		.locator('form')
		.filter({ has: page.getByRole('button', { name: label }) });
	if (note !== undefined) await form.locator('textarea').fill(note);
	await form.getByRole('button', { name: label }).click();
}

/** An ISO date `days` from today, in the browser's (local) calendar. */
export function localDate(days: number): string {
	const d = new Date();
	d.setDate(d.getDate() + days);
	const p = (n: number) => String(n).padStart(2, '0');
	return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())}`;
}

/**
 * From the overview, opens the issue page of the survey and issues one job due on `due`
 * (`onIssuePage` runs there first, e.g. to check it); ends on the survey page.
 */
export async function issueOneJobFromOverview(
	page: Page,
	base: string,
	surveyTitle: string | RegExp,
	due: string,
	onIssuePage?: () => Promise<void>
) {
	await page.goto(base + '/');
	const line = page.getByTestId('dashboard-issue').getByRole('link', { name: surveyTitle });
	await Promise.all([page.waitForURL(/\/jobs\/new$/), line.click()]);
	await page.getByLabel('Due date').fill(due);
	if (onIssuePage) await onIssuePage();
	await Promise.all([page.waitForURL(/\?jobs=issued$/), page.getByRole('button', { name: 'Issue 1 job' }).click()]);
}

/** From the overview, opens the job due (by its reference); ends on the job page. */
export async function openDueJob(page: Page, base: string, reference: string) {
	await page.goto(base + '/');
	await Promise.all([
		page.waitForURL(/\/jobs\/[0-9a-f-]{36}$/),
		page
			.getByTestId('dashboard-due')
			.getByRole('link', { name: new RegExp(reference) })
			.click()
	]);
}

export interface InstalledValues {
	torqueNm?: string;
	supplyV: string;
	polarity: 'ok' | 'reversed';
	photo?: { name: string; mimeType: string; buffer: Buffer };
}

/** Fills the record form of one point (findings follow as it is typed); does not save. */
export async function fillRecord(page: Page, label: string, v: InstalledValues) {
	const form = page.locator(`[data-testid="job-point"][data-label="${label}"]`).getByTestId('record-form');
	if (v.torqueNm !== undefined) await form.getByLabel('Torque applied (N·m)').fill(v.torqueNm);
	await form.getByLabel('Supply voltage at the sensor (V)').fill(v.supplyV);
	await form.getByLabel('Polarity measured').selectOption(v.polarity);
	await form.getByRole('button', { name: 'Now' }).first().click();
	await form.getByRole('button', { name: 'Now' }).nth(1).click();
	if (v.photo) await form.getByLabel('Photo of the installed sensor').setInputFiles(v.photo);
	return form;
}

/** Saves the record of one point. */
export async function saveRecord(page: Page, label: string) {
	const point = page.locator(`[data-testid="job-point"][data-label="${label}"]`);
	await point
		.getByTestId('record-form')
		.getByRole('button', { name: `Save the record of ${label}` })
		.click();
	return point;
}

/** Closes the job on its page (with the reason when one is needed); ends on the closed job. */
export async function closeJobOnPage(page: Page, jobUrl: string, reason?: string) {
	await page.goto(jobUrl);
	if (reason) await page.getByLabel('Why close it anyway (required)').fill(reason);
	await Promise.all([page.waitForURL(/\?closed=1$/), page.getByRole('button', { name: 'Close the job' }).click()]);
	await expect.poll(() => page.getByTestId('job-status').textContent(), { timeout: 15_000 }).toBe('Closed');
}
