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
		'/settings/outbox'
	];
}, 120_000);
afterAll(async () => {
	await app?.stop();
	await t?.drop();
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
