import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { created, makeOrg, siteWithMachine } from '../helpers/register';
import type { Client } from '../helpers/http';
import type { Role } from '../../src/lib/server/db/types';

let t: TestDatabase;
let app: RunningApp;
let a: Record<Role, Client>;
let b: Record<Role, Client>;

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	a = (await makeOrg(t, app.url, 'Alder Water')).clients;
	b = (await makeOrg(t, app.url, 'Birch Mills', ['admin'])).clients;
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

describe('sites, areas and supply points', () => {
	it('creates, lists, updates and archives a site; an archived site leaves the list but stays readable', async () => {
		const site = await created(a.admin.json('POST', '/api/v1/sites', { name: '  North works ', code: 'NW', address: '1 River Road' }));
		expect(site).toMatchObject({ name: 'North works', code: 'NW', archivedAt: null });
		const patched = await a.engineer.json('PATCH', `/api/v1/sites/${site.id}`, { notes: 'Access via gate 2' });
		expect(patched.status).toBe(200);
		expect(await patched.json()).toMatchObject({ name: 'North works', notes: 'Access via gate 2' });

		const list = await (await a.viewer.json('GET', '/api/v1/sites')).json();
		expect(list.items.map((s: { id: string }) => s.id)).toContain(site.id);
		expect(list).toMatchObject({ page: 1, total: expect.any(Number) });

		const archived = await a.admin.json('DELETE', `/api/v1/sites/${site.id}`);
		expect(archived.status).toBe(200);
		expect((await archived.json()).archivedAt).toEqual(expect.any(String));
		const after = await (await a.viewer.json('GET', '/api/v1/sites')).json();
		expect(after.items.map((s: { id: string }) => s.id)).not.toContain(site.id);
		const inArchive = await (await a.viewer.json('GET', '/api/v1/sites?archived=archived')).json();
		expect(inArchive.items.map((s: { id: string }) => s.id)).toContain(site.id);
		const byId = await a.viewer.json('GET', `/api/v1/sites/${site.id}`);
		expect(byId.status).toBe(200);
		expect(await t.db.selectFrom('site').select('id').where('id', '=', site.id).executeTakeFirst()).toBeDefined();
	});

	it('validates with field errors', async () => {
		const r = await a.admin.json('POST', '/api/v1/sites', { name: '', code: 'x'.repeat(50) });
		expect(r.status).toBe(400);
		expect(r.headers.get('content-type')).toContain('application/problem+json');
		const body = await r.json();
		expect(body.errors.name).toEqual(['Enter the site name.']);
		expect(body.errors.code[0]).toMatch(/at most 40/);
	});

	it('supply points default to 24 V DC and belong to an area', async () => {
		const site = await created(a.admin.json('POST', '/api/v1/sites', { name: 'South works' }));
		const area = await created(a.admin.json('POST', '/api/v1/areas', { siteId: site.id, name: 'Blower house' }));
		const sp = await created(
			a.admin.json('POST', '/api/v1/supply-points', {
				areaId: area.id,
				name: 'Junction box JB-3',
				tag: 'JB-3',
				locationNote: 'East wall, 1.5 m up'
			})
		);
		expect(sp).toMatchObject({ voltageV: 24, maxCurrentA: null, areaId: area.id, siteId: site.id });
		const bad = await a.admin.json('POST', '/api/v1/supply-points', { areaId: area.id, name: 'Mains', voltageV: 230 });
		expect(bad.status).toBe(400);
		expect((await bad.json()).errors.voltageV[0]).toMatch(/at most 60 V/);
		const list = await (await a.viewer.json('GET', `/api/v1/supply-points?areaId=${area.id}`)).json();
		expect(list.items).toHaveLength(1);
		const areas = await (await a.viewer.json('GET', `/api/v1/areas?siteId=${site.id}`)).json();
		expect(areas.items[0]).toMatchObject({ name: 'Blower house', supplyPointCount: 1 });
		// An area of another organisation's site cannot be made.
		const foreign = await b.admin.json('POST', '/api/v1/areas', { siteId: site.id, name: 'Sneaky' });
		expect(foreign.status).toBe(404);
	});
});

describe('machines and bearings', () => {
	it('creates a machine with every field and reads it back', async () => {
		const { site, area } = await siteWithMachine(a.admin, '-x');
		const m = await created(
			a.engineer.json('POST', '/api/v1/machines', {
				siteId: site.id,
				areaId: area.id,
				name: 'Aeration blower 1',
				tag: 'B-101',
				kind: 'blower',
				speedRpm: 2960,
				speedMode: 'variable',
				speedSignal: true,
				powerKw: 110,
				foundation: 'flexible',
				hazardousArea: true,
				hazardousZoneNote: 'Zone 2 (gas group IIA)',
				notes: 'VFD driven'
			})
		);
		const got = await (await a.viewer.json('GET', `/api/v1/machines/${m.id}`)).json();
		expect(got).toMatchObject({
			name: 'Aeration blower 1',
			tag: 'B-101',
			kind: 'blower',
			speedRpm: 2960,
			speedMode: 'variable',
			speedSignal: true,
			powerKw: 110,
			foundation: 'flexible',
			hazardousArea: true,
			siteName: 'Test works-x',
			areaName: 'Pump hall'
		});
	});

	it('refuses bad machine input with one message per field', async () => {
		const { site } = await siteWithMachine(a.admin, '-v');
		const r = await a.admin.json('POST', '/api/v1/machines', {
			siteId: site.id,
			name: '',
			kind: 'turbine',
			speedRpm: -5,
			powerKw: 'lots',
			hazardousArea: true
		});
		expect(r.status).toBe(400);
		const e = (await r.json()).errors;
		expect(e.name).toBeDefined();
		expect(e.kind[0]).toMatch(/motor, pump, fan/);
		expect(e.speedRpm[0]).toMatch(/more than 0/);
		expect(e.powerKw[0]).toMatch(/number/);
		expect(e.hazardousZoneNote[0]).toMatch(/hazardous zone/);
	});

	it('a tag names one live machine; archiving frees it', async () => {
		const { site, machine } = await siteWithMachine(a.admin, '-t');
		const dup = await a.admin.json('POST', '/api/v1/machines', { siteId: site.id, name: 'Other', tag: 'p-1-T', kind: 'motor' });
		expect(dup.status).toBe(409);
		expect((await dup.json()).errors.tag[0]).toMatch(/already has the tag/);
		expect((await a.admin.json('DELETE', `/api/v1/machines/${machine.id}`)).status).toBe(200);
		await created(a.admin.json('POST', '/api/v1/machines', { siteId: site.id, name: 'Other', tag: 'P-1-t', kind: 'motor' }));
	});

	it('archived machines leave lists and stay readable by id, with their bearings', async () => {
		const { machine } = await siteWithMachine(a.admin, '-a');
		const bearing = await created(
			a.admin.json('POST', `/api/v1/machines/${machine.id}/bearings`, {
				position: 'drive_end',
				component: 'pump',
				rollingElements: 9,
				rollingElementDMm: 7.94,
				pitchDMm: 39.04
			})
		);
		expect((await a.admin.json('DELETE', `/api/v1/machines/${machine.id}`)).status).toBe(200);
		const list = await (await a.viewer.json('GET', '/api/v1/machines?q=Raw%20water%20pump-a')).json();
		expect(list.items).toHaveLength(0);
		const archivedList = await (await a.viewer.json('GET', '/api/v1/machines?archived=archived&q=pump-a')).json();
		expect(archivedList.items.map((m: { id: string }) => m.id)).toEqual([machine.id]);
		const got = await a.viewer.json('GET', `/api/v1/machines/${machine.id}`);
		expect(got.status).toBe(200);
		expect((await got.json()).archivedAt).toEqual(expect.any(String));
		expect((await a.viewer.json('GET', `/api/v1/bearings/${bearing.id}`)).status).toBe(200);
		// No new bearings on an archived machine; restore brings it back.
		expect((await a.admin.json('POST', `/api/v1/machines/${machine.id}/bearings`, { position: 'non_drive_end' })).status).toBe(409);
		expect((await a.admin.json('POST', `/api/v1/machines/${machine.id}/restore`)).status).toBe(200);
		expect((await (await a.viewer.json('GET', '/api/v1/machines?q=pump-a')).json()).total).toBe(1);
	});

	it('bearings: geometry is validated, listed drive end first, archived not deleted', async () => {
		const { machine } = await siteWithMachine(a.admin, '-b');
		const bad = await a.technician.json('POST', `/api/v1/machines/${machine.id}/bearings`, {
			position: 'middle',
			rollingElements: 2.5,
			rollingElementDMm: 50,
			pitchDMm: 40,
			contactAngleDeg: 95
		});
		expect(bad.status).toBe(400);
		const e = (await bad.json()).errors;
		expect(e.position[0]).toMatch(/drive end or non-drive end/);
		expect(e.rollingElements[0]).toMatch(/whole number/);
		expect(e.contactAngleDeg[0]).toMatch(/less than 90/);
		const crossing = await a.technician.json('POST', `/api/v1/machines/${machine.id}/bearings`, {
			position: 'drive_end',
			rollingElementDMm: 50,
			pitchDMm: 40
		});
		expect((await crossing.json()).errors.rollingElementDMm[0]).toMatch(/smaller than the pitch/);

		const nde = await created(
			a.technician.json('POST', `/api/v1/machines/${machine.id}/bearings`, {
				position: 'non_drive_end',
				component: 'motor',
				rollingElements: '8',
				rollingElementDMm: '7,94',
				pitchDMm: '34.5'
			})
		);
		expect(nde).toMatchObject({ rollingElements: 8, rollingElementDMm: 7.94, pitchDMm: 34.5, contactAngleDeg: 0 });
		const de = await created(
			a.technician.json('POST', `/api/v1/machines/${machine.id}/bearings`, {
				position: 'drive_end',
				component: 'motor',
				rollingElements: 9,
				rollingElementDMm: 9.53,
				pitchDMm: 46
			})
		);
		const list = await (await a.viewer.json('GET', `/api/v1/machines/${machine.id}/bearings`)).json();
		expect(list.items.map((x: { id: string }) => x.id)).toEqual([de.id, nde.id]);
		// An update is checked against the row as it will be.
		const upd = await a.technician.json('PATCH', `/api/v1/bearings/${de.id}`, { pitchDMm: 9 });
		expect(upd.status).toBe(400);
		expect((await a.technician.json('PATCH', `/api/v1/bearings/${de.id}`, { pitchDMm: 46.5, designation: '6309-type' })).status).toBe(200);
		expect((await a.technician.json('DELETE', `/api/v1/bearings/${de.id}`)).status).toBe(200);
		const after = await (await a.viewer.json('GET', `/api/v1/machines/${machine.id}/bearings`)).json();
		expect(after.items.map((x: { id: string }) => x.id)).toEqual([nde.id]);
		expect(await t.db.selectFrom('bearing').select('archived_at').where('id', '=', de.id).executeTakeFirstOrThrow()).toMatchObject({
			archived_at: expect.any(Date)
		});
	});

	it('an area of another site is refused', async () => {
		const one = await siteWithMachine(a.admin, '-s1');
		const two = await siteWithMachine(a.admin, '-s2');
		const r = await a.admin.json('PATCH', `/api/v1/machines/${one.machine.id}`, { areaId: two.area.id });
		expect(r.status).toBe(400);
		expect((await r.json()).errors.areaId[0]).toMatch(/another site/);
	});
});

describe('roles', () => {
	it('viewers read only; technicians edit field data and bearings; engineers do everything', async () => {
		const { site, machine } = await siteWithMachine(a.admin, '-r');
		expect((await a.viewer.json('GET', `/api/v1/machines/${machine.id}`)).status).toBe(200);
		expect((await a.viewer.json('PATCH', `/api/v1/machines/${machine.id}`, { notes: 'x' })).status).toBe(403);
		expect((await a.viewer.json('POST', '/api/v1/sites', { name: 'V' })).status).toBe(403);
		expect((await a.viewer.json('POST', `/api/v1/machines/${machine.id}/bearings`, { position: 'drive_end' })).status).toBe(403);

		const field = await a.technician.json('PATCH', `/api/v1/machines/${machine.id}`, {
			speedRpm: 1475,
			notes: 'Nameplate read on the walk',
			foundation: 'flexible'
		});
		expect(field.status).toBe(200);
		expect(await field.json()).toMatchObject({ speedRpm: 1475, foundation: 'flexible' });
		const rename = await a.technician.json('PATCH', `/api/v1/machines/${machine.id}`, { name: 'Renamed' });
		expect(rename.status).toBe(403);
		expect((await rename.json()).detail).toMatch(/field data only/);
		expect((await a.technician.json('POST', '/api/v1/machines', { siteId: site.id, name: 'T', kind: 'fan' })).status).toBe(403);
		expect((await a.technician.json('DELETE', `/api/v1/machines/${machine.id}`)).status).toBe(403);

		expect((await a.engineer.json('PATCH', `/api/v1/machines/${machine.id}`, { name: 'Renamed pump' })).status).toBe(200);
	});
});

describe('tenancy', () => {
	it('another organisation gets 404 for machines, bearings, sites, areas and supply points', async () => {
		const { site, area, machine } = await siteWithMachine(a.admin, '-n');
		const bearing = await created(a.admin.json('POST', `/api/v1/machines/${machine.id}/bearings`, { position: 'drive_end' }));
		const sp = await created(a.admin.json('POST', '/api/v1/supply-points', { areaId: area.id, name: 'JB-9' }));
		for (const path of [
			`/api/v1/machines/${machine.id}`,
			`/api/v1/machines/${machine.id}/bearings`,
			`/api/v1/machines/${machine.id}/media`,
			`/api/v1/bearings/${bearing.id}`,
			`/api/v1/sites/${site.id}`,
			`/api/v1/areas/${area.id}`,
			`/api/v1/supply-points/${sp.id}`
		]) {
			const r = await b.admin.json('GET', path);
			expect(r.status, path).toBe(404);
		}
		expect((await b.admin.json('PATCH', `/api/v1/machines/${machine.id}`, { notes: 'x' })).status).toBe(404);
		expect((await b.admin.json('DELETE', `/api/v1/machines/${machine.id}`)).status).toBe(404);
		expect((await b.admin.json('POST', '/api/v1/machines', { siteId: site.id, name: 'Stolen', kind: 'pump' })).status).toBe(404);
		const theirs = await (await b.admin.json('GET', '/api/v1/machines')).json();
		expect(theirs.total).toBe(0);
		expect((await a.admin.json('GET', `/api/v1/machines/${machine.id}`)).status).toBe(200);
	});
});

describe('the machine list', () => {
	it('sorts, filters, searches and pages on the server', async () => {
		const site = await created(a.admin.json('POST', '/api/v1/sites', { name: 'Big plant' }));
		const kinds = ['motor', 'pump', 'fan'] as const;
		for (let i = 1; i <= 25; i++) {
			await created(
				a.admin.json('POST', '/api/v1/machines', {
					siteId: site.id,
					name: `Unit ${String(i).padStart(2, '0')}`,
					tag: `BP-${i}`,
					kind: kinds[i % 3],
					speedRpm: 500 + i * 100,
					hazardousArea: i === 7,
					hazardousZoneNote: i === 7 ? 'Zone 1' : ''
				})
			);
		}
		const p1 = await (await a.viewer.json('GET', `/api/v1/machines?siteId=${site.id}&sort=speed&dir=desc&perPage=10`)).json();
		expect(p1).toMatchObject({ total: 25, page: 1, perPage: 10, pages: 3 });
		expect(p1.items[0].name).toBe('Unit 25');
		const p3 = await (await a.viewer.json('GET', `/api/v1/machines?siteId=${site.id}&sort=speed&dir=desc&perPage=10&page=3`)).json();
		expect(p3.items.map((m: { name: string }) => m.name)).toEqual(['Unit 05', 'Unit 04', 'Unit 03', 'Unit 02', 'Unit 01']);
		const fans = await (await a.viewer.json('GET', `/api/v1/machines?siteId=${site.id}&kind=fan`)).json();
		expect(fans.total).toBe(8);
		const search = await (await a.viewer.json('GET', `/api/v1/machines?q=bp-1`)).json();
		expect(search.total).toBe(11); // BP-1, BP-10 … BP-19
		const haz = await (await a.viewer.json('GET', `/api/v1/machines?siteId=${site.id}&hazardous=yes`)).json();
		expect(haz.items.map((m: { name: string }) => m.name)).toEqual(['Unit 07']);
		// A search string with LIKE wildcards matches them literally.
		expect((await (await a.viewer.json('GET', `/api/v1/machines?q=%25`)).json()).total).toBe(0);
	});
});
