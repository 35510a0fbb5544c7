import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { hashPassword } from '../../src/lib/server/auth/password';
import type { Role } from '../../src/lib/server/db/types';
import { DEFAULT_THRESHOLDS, THRESHOLD_KEYS } from '../../src/lib/trade';

let t: TestDatabase;
let app: RunningApp;
const PW = 'threshold pass 1';
const alpha = {} as Record<Role, Client>;
let bravoAdmin: Client;
let orgA: string;
let orgB: string;

async function makeOrg(name: string, roles: Role[]) {
	const org = await t.db.insertInto('organisation').values({ name }).returning('id').executeTakeFirstOrThrow();
	const hash = await hashPassword(PW);
	for (const role of roles) {
		const id = `${name.slice(0, 3).toLowerCase()}-${role}`;
		await t.db
			.insertInto('app_user')
			.values({ id, email: `${role}@${name.toLowerCase()}.test`, name: `${name} ${role}`, password_hash: hash })
			.execute();
		await t.db.insertInto('member').values({ organisation_id: org.id, user_id: id, role }).execute();
	}
	return org.id;
}

async function stored(orgId: string) {
	const row = await t.db.selectFrom('organisation').select('settings').where('id', '=', orgId).executeTakeFirstOrThrow();
	return (row.settings as Record<string, unknown>).thresholds ?? {};
}

/** The whole form as the page shows it: every field filled with the value in force. */
function fullForm(overrides: Record<string, string> = {}) {
	const f: Record<string, string> = {};
	for (const k of THRESHOLD_KEYS) f[k] = String(DEFAULT_THRESHOLDS[k]);
	return { ...f, ...overrides };
}

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	orgA = await makeOrg('Alpha', ['admin', 'engineer', 'technician', 'viewer']);
	orgB = await makeOrg('Bravo', ['admin']);
	for (const role of ['admin', 'engineer', 'technician', 'viewer'] as Role[]) {
		alpha[role] = new Client(app.url);
		await alpha[role].signIn(`${role}@alpha.test`, PW);
	}
	bravoAdmin = new Client(app.url);
	await bravoAdmin.signIn('admin@bravo.test', PW);
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

describe('thresholds API', () => {
	it('reads the defaults with their metadata when nothing is stored', async () => {
		const res = await alpha.viewer.json('GET', '/api/v1/settings/thresholds');
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body.overrides).toEqual({});
		expect(body.effective).toEqual(DEFAULT_THRESHOLDS);
		expect(body.effective.distanceWarnMm).toBe(75); // TRADE.md default (common practice)
		expect(body.effective.supplyMinV).toBe(20.4); // IEC 61131-2, −15 % of 24 V (percentage from memory)
		const warn = body.fields.find((f: { key: string }) => f.key === 'distanceWarnMm');
		expect(warn).toMatchObject({ unit: 'mm', default: 75, firmness: 'common practice' });
		expect(warn.source).toMatch(/no standard gives a number/);
	});

	it('refuses anyone not signed in', async () => {
		expect((await new Client(app.url).json('GET', '/api/v1/settings/thresholds')).status).toBe(401);
	});

	it('an engineer saves overrides; only values that differ from the defaults are stored, and the change is audited', async () => {
		const res = await alpha.engineer.json('PUT', '/api/v1/settings/thresholds', {
			distanceWarnMm: 50,
			maxSurfaceTempC: 120,
			minFlatDiameterMm: 30 // the default: not stored
		});
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body.overrides).toEqual({ distanceWarnMm: 50, maxSurfaceTempC: 120 });
		expect(body.effective).toEqual({ ...DEFAULT_THRESHOLDS, distanceWarnMm: 50, maxSurfaceTempC: 120 });
		expect(await stored(orgA)).toEqual({ distanceWarnMm: 50, maxSurfaceTempC: 120 });
		const audit = await t.db
			.selectFrom('audit_event')
			.selectAll()
			.where('organisation_id', '=', orgA)
			.where('action', '=', 'thresholds.saved')
			.execute();
		expect(audit).toHaveLength(1);
		expect(audit[0].actor_user_id).toBe('alp-engineer');
		expect(audit[0].data).toMatchObject({ changed: { distanceWarnMm: { from: 75, to: 50 }, maxSurfaceTempC: { from: 80, to: 120 } } });
	});

	it('technicians and viewers may read but not change or reset', async () => {
		expect((await alpha.technician.json('GET', '/api/v1/settings/thresholds')).status).toBe(200);
		for (const role of ['technician', 'viewer'] as const) {
			const put = await alpha[role].json('PUT', '/api/v1/settings/thresholds', { distanceWarnMm: 10 });
			expect(put.status, role).toBe(403);
			expect(put.headers.get('content-type')).toContain('application/problem+json');
			expect((await alpha[role].json('DELETE', '/api/v1/settings/thresholds')).status, role).toBe(403);
		}
		expect(await stored(orgA)).toEqual({ distanceWarnMm: 50, maxSurfaceTempC: 120 });
	});

	it('a negative length or an out-of-range value is refused with field errors and nothing is stored', async () => {
		const neg = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { distanceFailMm: -5, minFlatDiameterMm: 40 });
		expect(neg.status).toBe(400);
		expect(neg.headers.get('content-type')).toContain('application/problem+json');
		const negBody = await neg.json();
		expect(negBody.errors.distanceFailMm[0]).toMatch(/cannot be negative/);
		expect(negBody.errors.minFlatDiameterMm).toBeUndefined();

		const range = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { minSpeedRpm: 50_000, maxSurfaceTempC: 'hot' });
		expect(range.status).toBe(400);
		const rangeBody = await range.json();
		expect(rangeBody.errors.minSpeedRpm[0]).toMatch(/at most 10000 r\/min/);
		expect(rangeBody.errors.maxSurfaceTempC[0]).toMatch(/must be a number/);

		const unknown = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { distanceWarnMM: 10 });
		expect(unknown.status).toBe(400);
		expect((await unknown.json()).errors._[0]).toMatch(/Unknown threshold: distanceWarnMM/);

		const notObject = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', [1, 2]);
		expect(notObject.status).toBe(400);

		expect(await stored(orgA)).toEqual({ distanceWarnMm: 50, maxSurfaceTempC: 120 });
	});

	it('a check distance at or above the fail distance is refused', async () => {
		for (const body of [{ distanceWarnMm: 150 }, { distanceWarnMm: 200, distanceFailMm: 150 }, { distanceFailMm: 75 }]) {
			const res = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', body);
			expect(res.status, JSON.stringify(body)).toBe(400);
			const errors = (await res.json()).errors;
			const msg = (errors.distanceWarnMm ?? errors.distanceFailMm)[0];
			expect(msg).toMatch(/check level .* (must be below|must not be above) the fail level/);
		}
		// The fail distance alone was sent, so the error sits on that field.
		expect(
			(await (await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { distanceFailMm: 75 })).json()).errors.distanceFailMm
		).toBeDefined();
		expect(await stored(orgA)).toEqual({ distanceWarnMm: 50, maxSurfaceTempC: 120 });
	});

	it('supply window and mounting ranges must keep their order', async () => {
		const supply = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { supplyMinV: 25 });
		expect(supply.status).toBe(400);
		expect((await supply.json()).errors.supplyMinV[0]).toMatch(/below the nominal/);
		const supplyMax = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { supplyMaxV: 23 });
		expect((await supplyMax.json()).errors.supplyMaxV[0]).toMatch(/above the nominal/);
		// Harris' Shock and Vibration Handbook: usable range falls stud > pad > magnet > hand-held (ordering published).
		const hand = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { usableFreqHandHeldHz: 6000 });
		expect((await hand.json()).errors.usableFreqHandHeldHz[0]).toMatch(/hand-held probe .* must be below the magnet/);
		const magnet = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { usableFreqMagnetHz: 9000 });
		expect((await magnet.json()).errors.usableFreqMagnetHz[0]).toMatch(/must be below the bonded pad/);
		const pad = await alpha.admin.json('PUT', '/api/v1/settings/thresholds', { usableFreqPadFraction: 1.2 });
		expect((await pad.json()).errors.usableFreqPadFraction).toBeDefined();
		expect(await stored(orgA)).toEqual({ distanceWarnMm: 50, maxSurfaceTempC: 120 });
	});

	it("another organisation's thresholds are its own", async () => {
		const res = await bravoAdmin.json('PUT', '/api/v1/settings/thresholds', { distanceWarnMm: 40, distanceFailMm: 90 });
		expect(res.status).toBe(200);
		expect(await stored(orgB)).toEqual({ distanceWarnMm: 40, distanceFailMm: 90 });
		const a = await (await alpha.viewer.json('GET', '/api/v1/settings/thresholds')).json();
		expect(a.effective.distanceWarnMm).toBe(50);
		expect(a.effective.distanceFailMm).toBe(150);
	});

	it('reset puts every value back to its default, audited, and leaves the other organisation alone', async () => {
		const res = await alpha.admin.json('DELETE', '/api/v1/settings/thresholds');
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body.overrides).toEqual({});
		expect(body.effective).toEqual(DEFAULT_THRESHOLDS);
		expect(await stored(orgA)).toEqual({});
		expect(await stored(orgB)).toEqual({ distanceWarnMm: 40, distanceFailMm: 90 });
		const audit = await t.db.selectFrom('audit_event').select(['actor_user_id', 'data']).where('action', '=', 'thresholds.reset').execute();
		expect(audit).toEqual([{ actor_user_id: 'alp-admin', data: { previousOverrides: { distanceWarnMm: 50, maxSurfaceTempC: 120 } } }]);
	});
});

describe('thresholds settings page', () => {
	it('is linked from the organisation settings', async () => {
		expect(await (await alpha.viewer.get('/settings/organisation')).text()).toContain('href="/settings/thresholds"');
	});

	it('shows each field with its unit, default, firmness and source', async () => {
		const res = await alpha.engineer.get('/settings/thresholds');
		expect(res.status).toBe(200);
		const html = await res.text();
		for (const k of THRESHOLD_KEYS) expect(html).toContain(`name="${k}"`);
		expect(html).toContain('Kim, Tan &amp; Kosse 2008'); // source of the 600 r/min default (published)
		expect(html).toMatch(/data-firmness="from memory"/);
		expect(html).toMatch(/data-firmness="published"/);
		expect(html).toMatch(/data-firmness="common practice"/);
		expect(html).toContain('Reset to defaults');
	});

	it('a technician and a viewer get a read-only view', async () => {
		for (const role of ['technician', 'viewer'] as const) {
			const html = await (await alpha[role].get('/settings/thresholds')).text();
			expect(html, role).not.toContain('name="distanceWarnMm"');
			expect(html, role).not.toContain('Reset to defaults');
			expect(html, role).toContain('Only admins and engineers can change the thresholds');
			expect(html, role).toContain('Distance to bearing: check above');
		}
		const post = await alpha.technician.form('/settings/thresholds?/save', fullForm({ distanceWarnMm: '10' }));
		expect(post.status).toBe(403);
		expect(await stored(orgA)).toEqual({});
	});

	it('a bad value shows its error beside the field, keeps what was typed, and stores nothing', async () => {
		const res = await alpha.engineer.form(
			'/settings/thresholds?/save',
			fullForm({ distanceFailMm: '-5', minFlatDiameterMm: '42', maxSurfaceTempC: 'abc' })
		);
		expect(res.status).toBe(400);
		const html = await res.text();
		expect(html).toMatch(/data-field-error="distanceFailMm"[^>]*>[\s\S]*?cannot be negative/);
		expect(html).toMatch(/data-field-error="maxSurfaceTempC"[^>]*>[\s\S]*?must be a number/);
		expect(html).not.toContain('data-field-error="minFlatDiameterMm"');
		expect(html).toMatch(/name="distanceFailMm"[^>]*value="-5"|value="-5"[^>]*name="distanceFailMm"/);
		expect(html).toMatch(/name="minFlatDiameterMm"[^>]*value="42"|value="42"[^>]*name="minFlatDiameterMm"/);
		expect(html).toMatch(/name="maxSurfaceTempC"[^>]*value="abc"|value="abc"[^>]*name="maxSurfaceTempC"/);
		expect(html).toContain('Nothing was saved.');
		expect(await stored(orgA)).toEqual({});
	});

	it('a check distance equal to the fail distance is refused beside the field', async () => {
		const res = await alpha.engineer.form('/settings/thresholds?/save', fullForm({ distanceWarnMm: '150', distanceFailMm: '150' }));
		expect(res.status).toBe(400);
		expect(await res.text()).toMatch(/data-field-error="distanceWarnMm"[^>]*>[\s\S]*?must be below the fail level/);
		expect(await stored(orgA)).toEqual({});
	});

	it('a valid form saves; comma decimals and empty fields (defaults) are understood', async () => {
		const res = await alpha.engineer.form(
			'/settings/thresholds?/save',
			fullForm({ studTorqueLimitNm: '7,5', minSpeedRpm: '', distanceWarnMm: '60' })
		);
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('Saved.');
		expect(await stored(orgA)).toEqual({ studTorqueLimitNm: 7.5, distanceWarnMm: 60 });
		// As a browser shows it: runs of white space in the markup are one space on screen.
		const html = (await (await alpha.engineer.get('/settings/thresholds')).text()).replace(/\s+/g, ' ');
		expect(html).toMatch(/2 values differ from the defaults/);
	});

	it('reset needs a confirmation, then restores the defaults', async () => {
		const unconfirmed = await alpha.admin.form('/settings/thresholds?/reset', {});
		expect(unconfirmed.status).toBe(400);
		expect(await stored(orgA)).toEqual({ studTorqueLimitNm: 7.5, distanceWarnMm: 60 });
		const viewer = await alpha.viewer.form('/settings/thresholds?/reset', { confirm: 'yes' });
		expect(viewer.status).toBe(403);
		const ok = await alpha.admin.form('/settings/thresholds?/reset', { confirm: 'yes' });
		expect(ok.status).toBe(200);
		expect(await ok.text()).toContain('Back to the defaults.');
		expect(await stored(orgA)).toEqual({});
		expect(await stored(orgB)).toEqual({ distanceWarnMm: 40, distanceFailMm: 90 });
	});
});
