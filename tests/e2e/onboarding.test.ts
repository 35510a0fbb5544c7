import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { startTestMail } from '../helpers/mail';
import { openBrowser, signInPage, type Browser } from '../helpers/browser';

let t: TestDatabase;
let app: RunningApp;
let mail: Awaited<ReturnType<typeof startTestMail>>;
let admin: Browser;
let tech: Browser;

beforeAll(async () => {
	t = await createTestDatabase();
	mail = await startTestMail();
	app = await startApp({ databaseUrl: t.url, env: mail.env });
	admin = await openBrowser({ width: 1180 });
	tech = await openBrowser({ width: 820, touch: true }); // the technician is on a tablet
});
afterAll(async () => {
	await admin?.close();
	await tech?.close();
	await app?.stop();
	await mail?.close();
	await t?.drop();
});

describe('onboarding in the browser', () => {
	it('sign up by e-mail link, invite a technician who accepts from the mail, and see the technician view', async () => {
		const p = admin.page;
		await p.goto(`${app.url}/sign-up`);
		await p.getByLabel('Organisation').fill('Kestrel Mill Services');
		await p.getByLabel('Your name').fill('Rhiannon Vale');
		await p.getByLabel('E-mail').fill('rhiannon@kestrel.test');
		await p.getByLabel('Password').fill('kestrel mill 2026');
		await p.getByRole('button', { name: 'Create organisation' }).click();
		// Sign-up finishes through the link mailed to the address.
		await expect.poll(() => p.getByText('Check your e-mail').count()).toBe(1);
		const welcome = mail.linkIn(await mail.waitFor('rhiannon@kestrel.test', /Finish creating/), '/sign-up/confirm/');
		await p.goto(welcome);
		await p.getByRole('button', { name: 'Create organisation and sign in' }).click();
		await p.waitForURL(`${app.url}/?welcome=1`);
		await expect.poll(() => p.getByTestId('role-badge').textContent()).toContain('admin');

		// A form error stays beside the field and keeps what was typed.
		await p.goto(`${app.url}/settings/members`);
		await p.getByLabel('E-mail').fill('not-an-address');
		await p.getByLabel('E-mail').evaluate((el: HTMLInputElement) => (el.type = 'text')); // let the server judge it
		await p.getByRole('button', { name: 'Send invitation' }).click();
		await expect.poll(() => p.locator('[data-field-error="email"]').textContent()).toContain('valid e-mail');
		expect(await p.getByLabel('E-mail').inputValue()).toBe('not-an-address');

		await p.getByLabel('E-mail').fill('owen@kestrel.test');
		await p.getByLabel('Role', { exact: true }).selectOption('technician');
		await p.getByRole('button', { name: 'Send invitation' }).click();
		await expect.poll(() => p.getByText('Invitation sent to owen@kestrel.test').count()).toBe(1);

		// The admin's outbox lists the invitation and its delivery, but not the link: that is for
		// the technician's mailbox alone.
		const invitation = await mail.waitFor('owen@kestrel.test', /invited/);
		await p.goto(`${app.url}/settings/outbox`);
		const listed = p.locator('[data-testid=mail]').filter({ hasText: 'owen@kestrel.test' });
		await expect.poll(() => listed.textContent()).toContain('link for the recipient only');
		expect(await listed.locator('a[href*="/invite/"]').count()).toBe(0);
		const link = mail.linkIn(invitation, '/invite/');

		const q = tech.page;
		await q.goto(link!);
		await expect.poll(() => q.getByRole('heading', { level: 1 }).textContent()).toContain('Kestrel Mill Services');
		await q.getByLabel('Your name').fill('Owen Ashby');
		await q.getByLabel('Choose a password').fill('owen tech pass 1');
		await q.getByRole('button', { name: 'Accept and join' }).click();
		await q.waitForURL(`${app.url}/?joined=1`);

		// Sign out and sign in again as the technician.
		await q.getByRole('button', { name: 'Sign out' }).click();
		await q.waitForURL(/\/sign-in/);
		await signInPage(q, app.url, 'owen@kestrel.test', 'owen tech pass 1');
		await expect.poll(() => q.getByTestId('role-badge').textContent()).toContain('technician');
		expect(await q.getByTestId('role-intro').textContent()).toContain('walk the site');
		// The technician's view has no invitation form and no role controls.
		await q.goto(`${app.url}/settings/members`);
		expect(await q.getByRole('button', { name: 'Send invitation' }).count()).toBe(0);
		expect(await q.locator('select[name=role]').count()).toBe(0);
		expect(await q.getByText('Owen Ashby').count()).toBeGreaterThan(0);

		// The content security policy lets the app run: no CSP violations were logged.
		expect([...admin.errors, ...tech.errors].filter((e) => /Content Security Policy/i.test(e))).toEqual([]);
	});
});
