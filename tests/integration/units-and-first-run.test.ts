// A person's unit preference (stored per person; values stay SI) and the first-run checklist
// of an organisation, ticked off by the data and scoped to the organisation.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { makeOrg, siteWithMachine } from '../helpers/register';
import { firstRun } from '../../src/lib/server/first-run';
import { DEFAULT_THRESHOLDS, THRESHOLD_KEYS, formatInput, quantityOfUnit, THRESHOLD_META } from '../../src/lib/trade';

let t: TestDatabase;
let app: RunningApp;
let alpha: Awaited<ReturnType<typeof makeOrg>>;
let bravo: Awaited<ReturnType<typeof makeOrg>>;

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	alpha = await makeOrg(t, app.url, 'Alpha Pumps', ['admin', 'engineer', 'technician']);
	bravo = await makeOrg(t, app.url, 'Bravo Fans', ['admin']);
}, 60_000);
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

async function unitsOf(userId: string) {
	return (await t.db.selectFrom('app_user').select('unit_system').where('id', '=', userId).executeTakeFirstOrThrow()).unit_system;
}

describe('unit preference', () => {
	it('is metric until a person picks US customary, and belongs to that person only', async () => {
		expect(await unitsOf(alpha.userIds.technician)).toBe('metric');
		const res = await alpha.clients.technician.form('/settings/profile?/units', { unitSystem: 'us' });
		expect(res.status).toBe(200);
		expect(await unitsOf(alpha.userIds.technician)).toBe('us');
		expect(await unitsOf(alpha.userIds.engineer)).toBe('metric');
		const page = await (await alpha.clients.technician.get('/settings/profile')).text();
		expect(page).toMatch(/value="us"[^>]*checked|checked[^>]*value="us"/);
	});

	it('refuses anything but metric or US customary', async () => {
		const res = await alpha.clients.technician.form('/settings/profile?/units', { unitSystem: 'imperial-ish' });
		expect(res.status).toBe(400);
		expect(await unitsOf(alpha.userIds.technician)).toBe('us');
	});

	it('thresholds typed in inches and °F are stored in mm and °C', async () => {
		await alpha.clients.engineer.form('/settings/profile?/units', { unitSystem: 'us' });
		// The whole form as the page shows it in US units, with two values changed.
		const fields: Record<string, string> = { units: 'us' };
		for (const k of THRESHOLD_KEYS) {
			const q = quantityOfUnit(THRESHOLD_META.find((m) => m.key === k)!.unit);
			fields[k] = q ? formatInput(q, DEFAULT_THRESHOLDS[k], 'us') : String(DEFAULT_THRESHOLDS[k]);
		}
		// 2 in = 50.8 mm (1 in = 25.4 mm, NIST SP 811); 212 °F = 100 °C.
		const res = await alpha.clients.engineer.form('/settings/thresholds?/save', { ...fields, distanceWarnMm: '2', maxSurfaceTempC: '212' });
		expect(res.status).toBe(200);
		const row = await t.db.selectFrom('organisation').select('settings').where('id', '=', alpha.id).executeTakeFirstOrThrow();
		expect((row.settings as { thresholds: unknown }).thresholds).toEqual({ distanceWarnMm: 50.8, maxSurfaceTempC: 100 });
		// The page shows them back in the person's units.
		const page = await (await alpha.clients.engineer.get('/settings/thresholds')).text();
		expect(page).toContain('value="2"');
		expect(page).toContain('value="212"');
	});
});

describe('first-run checklist', () => {
	it('ticks itself off from the organisation’s own data only', async () => {
		const before = await firstRun(t.db, bravo.id, 'admin');
		expect(before.steps.map((s) => [s.key, s.done])).toEqual([
			['team', false],
			['machine', false],
			['bearings', false],
			['photo', false],
			['survey', false]
		]);
		expect(before.complete).toBe(false);

		// Alpha's machine and members do not tick Bravo's list.
		await siteWithMachine(alpha.clients.admin, '-a');
		expect((await firstRun(t.db, bravo.id, 'admin')).done).toBe(0);
		const a = await firstRun(t.db, alpha.id, 'admin');
		expect(a.steps.filter((s) => s.done).map((s) => s.key)).toEqual(['team', 'machine']);

		await siteWithMachine(bravo.clients.admin, '-b');
		expect((await firstRun(t.db, bravo.id, 'admin')).steps.filter((s) => s.done).map((s) => s.key)).toEqual(['machine']);
	});

	it('marks the steps each role can do', async () => {
		const tech = await firstRun(t.db, alpha.id, 'technician');
		expect(tech.steps.filter((s) => s.yours).map((s) => s.key)).toEqual(['bearings', 'photo']);
		expect(tech.steps.find((s) => s.key === 'team')!.who).toBe('An admin does this.');
		expect(tech.steps.find((s) => s.key === 'survey')!.who).toBe('An admin or engineer does this.');
	});
});
