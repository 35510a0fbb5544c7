// The register in a browser: an engineer registers a machine through the form, adds two
// bearings and uploads a photo on the machine page; the thumbnail appears without a reload,
// and the machine shows up in the table with its thumbnail.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { openBrowser, signInPage, type Browser } from '../helpers/browser';
import { PW, created, makeOrg } from '../helpers/register';
import { jpeg } from '../helpers/images';

let t: TestDatabase;
let app: RunningApp;
let b: Browser;
let siteId = '';

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	const org = await makeOrg(t, app.url, 'Fir Valley Water', ['engineer']);
	const site = await created(org.clients.engineer.json('POST', '/api/v1/sites', { name: 'Fir Valley works' }));
	siteId = site.id;
	await created(org.clients.engineer.json('POST', '/api/v1/areas', { siteId, name: 'High-lift pump house' }));
	b = await openBrowser({ width: 1180, height: 900, touch: true });
	await signInPage(b.page, app.url, 'engineer@firvalleywater.test', PW);
});
afterAll(async () => {
	await b?.close();
	await app?.stop();
	await t?.drop();
});

describe('register a machine in the browser', () => {
	it('registers a machine with two bearings, uploads a photo and shows its thumbnail', async () => {
		const { page } = b;
		await page.goto(`${app.url}/register/machines`);
		await expect.poll(() => page.getByText('No machines registered yet').isVisible()).toBe(true);
		await page.getByRole('link', { name: 'New machine' }).first().click();
		await page.waitForURL(/\/register\/machines\/new/);

		// A first try without a name shows the error beside the field and keeps what was typed.
		await page.getByLabel('Tag (optional)').fill('HL-P3');
		await page.getByLabel('Kind').selectOption('pump');
		await page.getByLabel('Area', { exact: true }).selectOption({ label: 'High-lift pump house' });
		await page.getByLabel('Nominal speed (r/min)').fill('1480');
		await page.getByLabel('Power (kW)').fill('90');
		await page.locator('input[name="name"]').evaluate((el) => el.removeAttribute('required'));
		await page.getByRole('button', { name: 'Register machine' }).click();
		await expect.poll(() => page.locator('[data-field-error="name"]').textContent()).toContain('Enter the machine name');
		expect(await page.getByLabel('Tag (optional)').inputValue()).toBe('HL-P3');

		await page.getByLabel('Name', { exact: true }).fill('High-lift pump 3');
		await page.getByLabel('Foundation').selectOption('rigid');
		await page.getByRole('button', { name: 'Register machine' }).click();
		await page.waitForURL(/\/register\/machines\/[0-9a-f-]{36}\?created=1/);
		await expect.poll(() => page.getByRole('heading', { name: 'High-lift pump 3' }).isVisible()).toBe(true);
		await expect.poll(() => page.getByTestId('bearings-empty').isVisible()).toBe(true);
		const machineId = page.url().match(/machines\/([0-9a-f-]{36})/)![1]!;

		// Two bearings, added through the API from the page.
		await page.getByRole('button', { name: 'Add a bearing' }).click();
		const form = page.getByRole('form', { name: 'New bearing' });
		await form.getByLabel('Component').fill('pump');
		await form.getByLabel('Designation (optional)').fill('6311 size');
		await form.getByLabel('Rolling elements (count)').fill('8');
		await form.getByLabel('Rolling-element diameter d (mm)').fill('20,64');
		await form.getByLabel('Pitch diameter D (mm)').fill('85');
		await form.getByRole('button', { name: 'Add bearing' }).click();
		await expect.poll(() => page.getByTestId('bearing-row').count()).toBe(1);

		await page.getByRole('button', { name: 'Add a bearing' }).click();
		const second = page.getByRole('form', { name: 'New bearing' });
		expect(await second.getByLabel('Position').inputValue()).toBe('non_drive_end');
		// A pitch diameter smaller than the rolling elements is refused beside the field.
		await second.getByLabel('Rolling elements (count)').fill('8');
		await second.getByLabel('Rolling-element diameter d (mm)').fill('20.64');
		await second.getByLabel('Pitch diameter D (mm)').fill('15');
		await second.getByRole('button', { name: 'Add bearing' }).click();
		await expect
			.poll(() => second.locator('[data-field-error="rollingElementDMm"]').textContent())
			.toContain('smaller than the pitch diameter');
		await second.getByLabel('Pitch diameter D (mm)').fill('85');
		await second.getByRole('button', { name: 'Add bearing' }).click();
		await expect.poll(() => page.getByTestId('bearing-row').count()).toBe(2);
		expect(await page.getByTestId('bearing-row').first().textContent()).toContain('Drive end (DE) · pump · 6311 size');
		expect(await page.getByTestId('bearing-row').nth(1).textContent()).toContain('Non-drive end (NDE)');

		// Upload a photo with the file input; the thumbnail appears without a reload.
		await expect.poll(() => page.getByTestId('media-empty').isVisible()).toBe(true);
		const file = join(mkdtempSync(join(tmpdir(), 'spotface-e2e-')), 'pump-de-side.jpg');
		writeFileSync(file, await jpeg(1600, 1200));
		await page.getByTestId('file-input').setInputFiles(file);
		await expect.poll(() => page.getByTestId('media-thumb').count(), { timeout: 20_000 }).toBe(1);
		const loaded = await page.getByTestId('media-thumb').evaluate(async (img: HTMLImageElement) => {
			if (!img.complete) await new Promise((r) => img.addEventListener('load', r, { once: true }));
			return { w: img.naturalWidth, h: img.naturalHeight };
		});
		expect(loaded).toEqual({ w: 480, h: 360 });
		await expect.poll(() => page.getByTestId('machine-todo').textContent()).toContain('Everything the walk needs is recorded');

		// The camera input is there for tablets.
		expect(await page.getByTestId('camera-input').getAttribute('capture')).toBe('environment');

		// The table lists it with its thumbnail.
		await page.goto(`${app.url}/register/machines?q=HL-P3`);
		const row = page.getByTestId('machine-row');
		await expect.poll(() => row.count()).toBe(1);
		expect(await row.locator('img').getAttribute('src')).toMatch(/\/api\/v1\/media\/[0-9a-f-]{36}\/thumb/);
		expect(await row.textContent()).toContain('ready to walk');
		const db = await t.db.selectFrom('bearing').select('id').where('machine_id', '=', machineId).execute();
		expect(db).toHaveLength(2);
		expect(b.errors.filter((e) => !/Failed to load resource: the server responded with a status of 400/.test(e))).toEqual([]);
	});
});
