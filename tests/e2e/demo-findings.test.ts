// One rule engine for the browser and the server: on the demo board, the worst finding the
// board shows for each point equals the one the server computes from the stored document (the
// findings that approval stores and the survey page counts).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { openBrowser, signInPage, type Browser } from '../helpers/browser';
import { seedDemo, DEMO_ORG, DEMO_PASSWORD } from '../../src/lib/server/db/seed';
import { DEMO_SURVEY } from '../../src/lib/server/db/seed-survey';
import { createStorage, storageConfigFromEnv } from '../../src/lib/server/storage/index';
import { surveyOpenItems } from '../../src/lib/server/review/open-items';

let t: TestDatabase;
let app: RunningApp;
let browser: Browser;

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	// The demo's photos go where the running app keeps its media.
	await seedDemo(t.db, [], { storage: createStorage(storageConfigFromEnv({}, app.dataDir)) });
	browser = await openBrowser({ width: 1280, height: 800 });
	await signInPage(browser.page, app.url, 'engineer@harrowgate.example', DEMO_PASSWORD);
});
afterAll(async () => {
	await browser?.close();
	await app?.stop();
	await t?.drop();
});

describe('findings on the demo board', () => {
	it('the browser shows the server’s findings, point by point', async () => {
		const org = await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirstOrThrow();
		const survey = await t.db
			.selectFrom('survey')
			.select('id')
			.where('organisation_id', '=', org.id)
			.where('title', '=', DEMO_SURVEY)
			.executeTakeFirstOrThrow();
		const [board] = await surveyOpenItems(t.db, org.id, survey.id);
		expect(board.points).toBeGreaterThan(0);
		const server = new Map(board.findings.map((f) => [f.label, f.worst]));

		await browser.page.goto(`${app.url}/surveys/${survey.id}/boards/${board.boardId}`);
		await browser.page.getByRole('tab', { name: /All points/ }).click();
		const rows = browser.page.getByTestId('finding-row');
		await expect.poll(() => rows.count(), { timeout: 15_000 }).toBe(board.points);
		const shown = new Map<string, string>();
		for (let i = 0; i < board.points; i++) {
			const row = rows.nth(i);
			const label = (await row.getAttribute('data-label')) ?? '';
			shown.set(label, (await row.locator('[data-severity]').first().getAttribute('data-severity')) ?? '');
		}
		expect(shown.size).toBe(board.points);
		for (const [label, severity] of shown) expect([label, severity]).toEqual([label, server.get(label) ?? 'pass']);
		// The demo has each kind: a failing cover point and points still to check.
		expect([...shown.values()]).toContain('fail');
	});
});
