// Debian's Chromium driven by playwright-core (no browser download).
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const ARGS = [
	'--headless',
	'--no-sandbox',
	'--disable-gpu',
	'--disable-quic',
	'--no-first-run',
	'--disable-background-networking',
	'--disable-component-update',
	'--disable-sync'
];

export interface Browser {
	context: BrowserContext;
	page: Page;
	close(): Promise<void>;
	errors: string[];
}

/** A fresh browser profile (its own cookies and IndexedDB), one page. */
export async function openBrowser(opts: { width?: number; height?: number; touch?: boolean } = {}): Promise<Browser> {
	const dir = mkdtempSync(join(tmpdir(), 'spotface-browser-'));
	const context = await chromium.launchPersistentContext(dir, {
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		args: ARGS,
		viewport: { width: opts.width ?? 1180, height: opts.height ?? 820 },
		hasTouch: opts.touch ?? false
	});
	const page = context.pages()[0] ?? (await context.newPage());
	const errors: string[] = [];
	page.on('pageerror', (e) => errors.push(e.message));
	page.on('console', (m) => {
		if (m.type() === 'error') errors.push(m.text());
	});
	return {
		context,
		page,
		errors,
		async close() {
			await context.close();
			rmSync(dir, { recursive: true, force: true });
		}
	};
}

export async function signInPage(page: Page, base: string, email: string, password: string) {
	await page.goto(`${base}/sign-in`);
	await page.getByLabel('E-mail').fill(email);
	await page.getByLabel('Password').fill(password);
	await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/sign-in')), page.getByRole('button', { name: 'Sign in' }).click()]);
}
