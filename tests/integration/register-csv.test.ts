import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { created, makeOrg } from '../helpers/register';
import type { Client } from '../helpers/http';

let t: TestDatabase;
let app: RunningApp;
let admin: Client;
let viewer: Client;
let orgId: string;

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	const org = await makeOrg(t, app.url, 'Elm Treatment', ['admin', 'viewer']);
	admin = org.clients.admin;
	viewer = org.clients.viewer;
	orgId = org.id;
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

function send(c: Client, body: string | Uint8Array, query: string) {
	return c.request(`/api/v1/machines/import?${query}`, {
		method: 'POST',
		headers: { 'content-type': 'text/csv', accept: 'application/json' },
		body: body as BodyInit
	});
}
const machineCount = async () =>
	Number(
		(
			await t.db
				.selectFrom('machine')
				.select((eb) => eb.fn.countAll<string>().as('n'))
				.where('organisation_id', '=', orgId)
				.executeTakeFirstOrThrow()
		).n
	);

describe('CSV import', () => {
	let siteId: string;
	beforeAll(async () => {
		siteId = (await created(admin.json('POST', '/api/v1/sites', { name: 'Elm works' }))).id;
		await created(admin.json('POST', '/api/v1/sites', { name: 'Oak works' }));
	});

	it('imports a valid file, creating the areas it names', async () => {
		const csv = [
			'name,tag,kind,speed_rpm,speed_mode,speed_signal,power_kw,foundation,hazardous_area,hazardous_zone_note,area,notes',
			'Raw water pump 1,RW-P1,pump,1480,constant,no,55,rigid,no,,Intake,',
			'Raw water pump 2,RW-P2,Pump,1480,constant,no,55,rigid,no,,Intake,"Seal replaced, 2025"',
			'Digester mixer,DG-M1,gearbox,35,variable,yes,15,,yes,"Zone 1, gas group IIA",Digesters,low speed'
		].join('\r\n');
		const before = await machineCount();
		const r = await send(admin, csv, `siteId=${siteId}`);
		const body = await r.json();
		expect(r.status, JSON.stringify(body)).toBe(201);
		expect(body.imported).toBe(3);
		expect(body.report.newAreas).toEqual([
			{ site: 'Elm works', area: 'Intake' },
			{ site: 'Elm works', area: 'Digesters' }
		]);
		expect(await machineCount()).toBe(before + 3);
		const m = await (await viewer.json('GET', '/api/v1/machines?q=DG-M1')).json();
		expect(m.items[0]).toMatchObject({
			name: 'Digester mixer',
			kind: 'gearbox',
			speedRpm: 35,
			speedMode: 'variable',
			speedSignal: true,
			powerKw: 15,
			foundation: null,
			hazardousArea: true,
			hazardousZoneNote: 'Zone 1, gas group IIA',
			areaName: 'Digesters',
			siteName: 'Elm works'
		});
		const p2 = await (await viewer.json('GET', '/api/v1/machines?q=RW-P2')).json();
		expect(p2.items[0].notes).toBe('Seal replaced, 2025');
	});

	it('a file with bad rows: the report names row and column, and nothing is written', async () => {
		const csv = [
			'site,name,tag,kind,speed_rpm,power_kw',
			'Elm works,Good fan,F-1,fan,980,7.5',
			'Elm works,,F-2,fan,980,7.5',
			'Elm works,Odd machine,F-3,turbine,fast,7.5',
			'Birch works,Lost fan,F-4,fan,980,7.5',
			'Elm works,Twin,F-1,fan,980,7.5',
			'Elm works,Old pump,RW-P1,pump,1480,55'
		].join('\n');
		const before = await machineCount();
		const r = await send(admin, csv, 'mode=all');
		expect(r.status).toBe(422);
		const body = await r.json();
		expect(body.detail).toMatch(/5 of 6 rows have problems: nothing was imported/);
		const errs = (row: number) => body.report.rows.find((x: { row: number }) => x.row === row).errors;
		expect(errs(2)).toEqual([]);
		expect(errs(3)).toEqual([{ column: 'name', message: expect.stringMatching(/Enter the machine name/) }]);
		expect(
			errs(4)
				.map((e: { column: string }) => e.column)
				.sort()
		).toEqual(['kind', 'speed_rpm']);
		expect(errs(5)).toEqual([{ column: 'site', message: expect.stringMatching(/No live site is named "Birch works"/) }]);
		expect(errs(6)).toEqual([{ column: 'tag', message: expect.stringMatching(/also on row 2/) }]);
		expect(errs(7)).toEqual([{ column: 'tag', message: expect.stringMatching(/already registered/) }]);
		expect(await machineCount()).toBe(before);

		// The user chooses to import only the good rows.
		const good = await send(admin, csv, 'mode=valid');
		const gb = await good.json();
		expect(good.status).toBe(201);
		expect(gb).toMatchObject({ imported: 1, skipped: 5 });
		expect(await machineCount()).toBe(before + 1);
	});

	it('an empty file, and a header without rows, are refused with a clear message', async () => {
		const empty = await send(admin, '', `siteId=${siteId}`);
		expect(empty.status).toBe(422);
		expect((await empty.json()).detail).toMatch(/The file is empty/);
		const headerOnly = await send(admin, 'name,kind\r\n\r\n', `siteId=${siteId}`);
		expect((await headerOnly.json()).detail).toMatch(/header row but no machines/);
		const noKind = await send(admin, 'name\nPump', `siteId=${siteId}`);
		expect((await noKind.json()).detail).toMatch(/no "kind" column/);
	});

	it('reads a spreadsheet export with a BOM, semicolons and decimal commas', async () => {
		const text =
			'\uFEFFName;Tag;Type;Speed (rpm);Power (kW);Hazardous area;Zone note\r\nSludge pump 4;SL-P4;pump;1450;7,5;nein;\r\nGrit blower;GR-B1;blower;2950;18,5;no;\r\n';
		const r = await send(admin, new TextEncoder().encode(text), `siteId=${siteId}&dryRun=true`);
		const body = await r.json();
		expect(body.report.delimiter).toBe(';');
		expect(body.report.columns).toEqual(['name', 'tag', 'kind', 'speed_rpm', 'power_kw', 'hazardous_area', 'hazardous_zone_note']);
		// "nein" is not a yes/no answer the importer knows: reported, not guessed.
		expect(body.report.rows[0].errors).toEqual([{ column: 'hazardous_area', message: expect.stringMatching(/answer yes or no/) }]);
		expect(body.report.rows[1].errors).toEqual([]);

		const fixed = text.replace('nein', 'no');
		const ok = await send(admin, new TextEncoder().encode(fixed), `siteId=${siteId}`);
		expect(ok.status).toBe(201);
		const m = await (await viewer.json('GET', '/api/v1/machines?q=SL-P4')).json();
		expect(m.items[0]).toMatchObject({ name: 'Sludge pump 4', powerKw: 7.5, speedRpm: 1450 });
	});

	it('reads a Windows-1252 file', async () => {
		const bytes = new Uint8Array([...new TextEncoder().encode('name,kind,notes\nP\u00f6mp,pump,'), 0xb0]); // "°" in Windows-1252
		const body = await (await send(admin, bytes, `siteId=${siteId}&dryRun=true`)).json();
		expect(body.report.rows[0].values.notes).toBe('°');
	});

	it('only engineers and admins import', async () => {
		expect((await send(viewer, 'name,kind\nX,pump', `siteId=${siteId}`)).status).toBe(403);
	});
});

describe('CSV export', () => {
	it('exports the filtered list with the import columns, and the file imports again', async () => {
		const r = await viewer.get('/api/v1/machines/export?q=RW-P', {});
		expect(r.status).toBe(200);
		expect(r.headers.get('content-type')).toContain('text/csv');
		expect(r.headers.get('content-disposition')).toMatch(/attachment; filename="machines-\d{4}-\d{2}-\d{2}\.csv"/);
		const bytes = new Uint8Array(await r.arrayBuffer());
		// A UTF-8 byte-order mark, so spreadsheet programs read accents right.
		expect([...bytes.slice(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
		const text = new TextDecoder().decode(bytes);
		const rows = Papa.parse<string[]>(text.trim()).data;
		expect(rows[0]).toEqual([
			'site',
			'area',
			'name',
			'tag',
			'kind',
			'speed_rpm',
			'speed_mode',
			'speed_signal',
			'power_kw',
			'foundation',
			'hazardous_area',
			'hazardous_zone_note',
			'notes'
		]);
		expect(rows.slice(1).map((x) => x[3])).toEqual(['RW-P1', 'RW-P2']);
		expect(rows[2]).toEqual([
			'Elm works',
			'Intake',
			'Raw water pump 2',
			'RW-P2',
			'pump',
			'1480',
			'constant',
			'no',
			'55',
			'rigid',
			'no',
			'',
			'Seal replaced, 2025'
		]);

		// Round trip into another site: only the tags clash, which the report says.
		const again = await send(admin, text, 'dryRun=true');
		const report = (await again.json()).report;
		expect(report.rows.map((x: { errors: Array<{ column: string }> }) => x.errors.map((e) => e.column))).toEqual([['tag'], ['tag']]);
	});

	it('guards cells that a spreadsheet would run as formulas', async () => {
		const site = await created(admin.json('POST', '/api/v1/sites', { name: 'Formula works' }));
		await created(admin.json('POST', '/api/v1/machines', { siteId: site.id, name: '=HYPERLINK("x")', kind: 'fan' }));
		const text = await (await viewer.get(`/api/v1/machines/export?siteId=${site.id}`, {})).text();
		expect(text).toContain(`'=HYPERLINK`);
	});
});
