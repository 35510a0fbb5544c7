// axe-core on every main page, as each role, on the demo organisation: no serious or critical
// violation (WCAG 2.0/2.1 A and AA rules), and every control and stand-alone link at least
// 44 × 44 px, at tablet width (820 × 1180).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { openBrowser, signInPage } from '../helpers/browser';
import { seriousViolations } from '../helpers/axe';
import { smallTargets } from '../helpers/touch-targets';
import { seedDemo, DEMO_ORG, DEMO_PASSWORD, DEMO_USERS } from '../../src/lib/server/db/seed';
import { DEMO_SURVEY } from '../../src/lib/server/db/seed-survey';
import { createStorage, storageConfigFromEnv } from '../../src/lib/server/storage/index';

let t: TestDatabase;
let app: RunningApp;
let pages: string[] = [];

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	await seedDemo(t.db, [], { storage: createStorage(storageConfigFromEnv({}, app.dataDir)) });
	const org = await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirstOrThrow();
	const machine = await t.db.selectFrom('machine').select('id').where('organisation_id', '=', org.id).executeTakeFirstOrThrow();
	const site = await t.db.selectFrom('site').select('id').where('organisation_id', '=', org.id).executeTakeFirstOrThrow();
	const survey = await t.db
		.selectFrom('survey')
		.select('id')
		.where('organisation_id', '=', org.id)
		.where('title', '=', DEMO_SURVEY)
		.executeTakeFirstOrThrow();
	const board = await t.db.selectFrom('board').select('id').where('survey_id', '=', survey.id).executeTakeFirstOrThrow();
	const member = await t.db.selectFrom('member').select('id').where('organisation_id', '=', org.id).executeTakeFirstOrThrow();
	const job = await t.db
		.selectFrom('installation_job')
		.select(['id', 'survey_id'])
		.where('organisation_id', '=', org.id)
		.orderBy('number')
		.executeTakeFirstOrThrow();
	pages = [
		'/',
		'/register',
		'/register/machines',
		`/register/machines/${machine.id}`,
		'/register/machines/new',
		`/register/sites/${site.id}`,
		'/register/import',
		'/surveys',
		'/surveys/new',
		`/surveys/${survey.id}`,
		`/surveys/${survey.id}/boards/${board.id}`,
		'/calculators',
		'/settings/organisation',
		'/settings/profile',
		'/settings/members',
		`/settings/members/${member.id}`,
		'/settings/thresholds',
		'/settings/outbox',
		'/settings/integration',
		'/api-reference',
		'/jobs',
		`/jobs/${job.id}`,
		`/surveys/${job.survey_id}`
	];
}, 120_000);
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

describe('keyboard only', () => {
	it('signs in by keyboard; on the board the first Tab stop is a visible skip link to the canvas, and nothing focusable hides behind the board', async () => {
		const b = await openBrowser({ width: 1280, height: 800 });
		try {
			const { page } = b;
			await page.goto(`${app.url}/sign-in`);
			// Tab to each field, type, and submit with Enter: no mouse anywhere.
			const focusedLabel = () =>
				page.evaluate(() => {
					const el = document.activeElement as HTMLInputElement | null;
					if (!el || el === document.body) return '';
					return el?.labels?.[0]?.textContent?.trim() ?? el?.getAttribute('aria-label') ?? el?.textContent?.trim() ?? '';
				});
			for (let i = 0; i < 10 && !/e-mail/i.test(await focusedLabel()); i++) await page.keyboard.press('Tab');
			expect(await focusedLabel()).toMatch(/e-mail/i);
			await page.keyboard.type(DEMO_USERS.find((u) => u.role === 'engineer')!.email);
			await page.keyboard.press('Tab');
			expect(await focusedLabel()).toMatch(/password/i);
			await page.keyboard.type(DEMO_PASSWORD);
			await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/sign-in')), page.keyboard.press('Enter')]);

			// The board page: the first Tab stop is the skip link, visible when focused, and it
			// lands on the board canvas.
			const boardPath = pages.find((p) => p.includes('/boards/'))!;
			await page.goto(`${app.url}${boardPath}`);
			await expect.poll(() => page.getByTestId('connection').getAttribute('data-status')).toBe('connected');
			await page.keyboard.press('Tab');
			const first = await page.evaluate(() => {
				const el = document.activeElement as HTMLElement;
				const r = el.getBoundingClientRect();
				return { text: el.textContent?.trim() ?? '', visible: r.width > 0 && r.height > 0 && getComputedStyle(el).visibility !== 'hidden' };
			});
			expect(first.text).toMatch(/skip/i);
			expect(first.visible).toBe(true);
			await page.keyboard.press('Enter');
			const landed = await page.evaluate(() => document.activeElement?.closest('[data-testid="board-canvas"]') !== null);
			expect(landed).toBe(true);
			// No Tab stop on the page is hidden behind the full-screen board.
			const hidden = await page.evaluate(() =>
				[...document.querySelectorAll<HTMLElement>('a[href], button, input, select, textarea, [tabindex]')]
					.filter((el) => el.tabIndex >= 0 && !(el as HTMLButtonElement).disabled && el.closest('[inert]') === null)
					.filter((el) => {
						const r = el.getBoundingClientRect();
						if (r.width === 0 || r.height === 0) return false;
						const top = document.elementFromPoint(r.left + r.width / 2, r.top + r.height / 2);
						return top !== null && !el.contains(top) && !top.contains(el) && el.closest('nav') !== null;
					})
					.map((el) => el.textContent?.trim())
			);
			expect(hidden).toEqual([]);
		} finally {
			await b.close();
		}
	}, 120_000);
});

describe('accessibility (axe-core)', () => {
	it('pages before sign-in', async () => {
		const b = await openBrowser({ width: 820, height: 1180 });
		try {
			const found: string[] = [];
			for (const path of ['/sign-in', '/sign-up', '/forgot-password']) {
				await b.page.goto(`${app.url}${path}`);
				for (const v of await seriousViolations(b.page)) found.push(`${path}: ${v}`);
			}
			expect(found.join('\n')).toBe('');
		} finally {
			await b.close();
		}
	}, 60_000);

	it.each(DEMO_USERS.map((u) => [u.role, u.email]))(
		'every main page as the %s',
		async (_role, email) => {
			const b = await openBrowser({ width: 820, height: 1180 });
			try {
				await signInPage(b.page, app.url, email, DEMO_PASSWORD);
				const found: string[] = [];
				for (const path of pages) {
					const res = await b.page.goto(`${app.url}${path}`);
					expect(res?.status() ?? 0, path).toBeLessThan(500);
					await b.page.waitForLoadState('load');
					for (const v of await seriousViolations(b.page)) found.push(`${path}: ${v}`);
					for (const v of await smallTargets(b.page)) found.push(`${path}: touch target ${v}`);
				}
				expect(found.join('\n')).toBe('');
			} finally {
				await b.close();
			}
		},
		180_000
	);
});
