// One organisation with an admin, an engineer and a technician, a pump with a photo in the
// register, and a planned survey with a board on that photo, made through the app's own API and
// pages as people do. Browser tests of the live board start from here.
import { expect } from 'vitest';
import sharp from 'sharp';
import type { TestDatabase } from './db';
import { Client } from './http';
import { hashPassword } from '../../src/lib/server/auth/password';

export const SCENARIO_PASSWORD = 'survey board pass 1';

export const SCENARIO_PEOPLE = [
	{ id: 'u-admin', email: 'admin@fenwick.test', name: 'Ada Admin', role: 'admin' as const },
	{ id: 'u-eng', email: 'engineer@fenwick.test', name: 'Esme Engineer', role: 'engineer' as const },
	{ id: 'u-tech', email: 'tech@fenwick.test', name: 'Teo Technician', role: 'technician' as const }
];

export interface BoardScenario {
	organisationId: string;
	surveyPath: string;
	boardId: string;
	/** Absolute URL of the board page. */
	boardUrl: string;
	engineer: Client;
}

async function json<T>(res: Promise<Response>, status = 201): Promise<T> {
	const r = await res;
	const body = await r.json();
	expect(r.status, JSON.stringify(body)).toBe(status);
	return body as T;
}

/** A machine photo stand-in: grey background with a darker housing shape, 1200 × 800 px. */
export function scenarioPhoto(): Promise<Buffer> {
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="800">
		<rect width="1200" height="800" fill="#8a949c"/>
		<rect x="200" y="250" width="520" height="300" rx="30" fill="#3f5566"/>
		<rect x="720" y="360" width="260" height="80" fill="#5b6b77"/>
		<circle cx="460" cy="400" r="90" fill="#2d3f4c"/>
	</svg>`;
	return sharp(Buffer.from(svg)).jpeg({ quality: 85 }).toBuffer();
}

export async function setUpBoardScenario(t: TestDatabase, appUrl: string): Promise<BoardScenario> {
	const org = await t.db.insertInto('organisation').values({ name: 'Fenwick Water (test)' }).returning('id').executeTakeFirstOrThrow();
	const hash = await hashPassword(SCENARIO_PASSWORD);
	for (const p of SCENARIO_PEOPLE) {
		await t.db.insertInto('app_user').values({ id: p.id, email: p.email, name: p.name, password_hash: hash }).execute();
		await t.db.insertInto('member').values({ organisation_id: org.id, user_id: p.id, role: p.role }).execute();
	}

	// The register through the API: site, area, a 24 V DC supply point, a pump and its photo.
	const admin = new Client(appUrl);
	await admin.signIn('admin@fenwick.test', SCENARIO_PASSWORD);
	const site = await json<{ id: string }>(admin.json('POST', '/api/v1/sites', { name: 'Millbrook Works' }));
	const area = await json<{ id: string }>(admin.json('POST', '/api/v1/areas', { siteId: site.id, name: 'Pump hall' }));
	await json(admin.json('POST', '/api/v1/supply-points', { areaId: area.id, name: 'Junction box', tag: 'JB-3', voltageV: 24 }));
	const machine = await json<{ id: string }>(
		admin.json('POST', '/api/v1/machines', {
			siteId: site.id,
			areaId: area.id,
			name: 'Raw water pump 2',
			tag: 'P-102',
			kind: 'pump',
			speedRpm: 1480,
			powerKw: 45,
			foundation: 'rigid'
		})
	);
	const form = new FormData();
	form.set('file', new Blob([new Uint8Array(await scenarioPhoto())], { type: 'image/jpeg' }), 'pump.jpg');
	form.set('kind', 'photo');
	form.set('caption', 'Drive end from the walkway');
	const media = await json<{ id: string; width: number; height: number }>(
		admin.request(`/api/v1/machines/${machine.id}/media`, { method: 'POST', body: form })
	);
	expect([media.width, media.height]).toEqual([1200, 800]);

	// The engineer plans the survey and starts the board through the pages, as on site.
	const engineer = new Client(appUrl);
	await engineer.signIn('engineer@fenwick.test', SCENARIO_PASSWORD);
	const plan = await engineer.request('/surveys/new', {
		method: 'POST',
		headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
		body: new URLSearchParams([
			['siteId', site.id],
			['title', 'Pump hall spring walk'],
			['plannedDate', '2026-04-14'],
			['notes', ''],
			['machineId', machine.id],
			['engineerId', 'u-eng'],
			['technicianId', 'u-tech']
		]).toString()
	});
	expect(plan.status, await plan.clone().text()).toBe(303);
	const surveyPath = plan.headers.get('location')!;
	expect(surveyPath).toMatch(/^\/surveys\/[0-9a-f-]{36}$/);

	const start = await engineer.form(`${surveyPath}?/board`, { machineId: machine.id, mediaId: media.id });
	expect(start.status).toBe(303);
	const boardUrl = appUrl + start.headers.get('location')!;
	expect(boardUrl).toMatch(/\/surveys\/[0-9a-f-]{36}\/boards\/[0-9a-f-]{36}$/);
	return { organisationId: org.id, surveyPath, boardId: boardUrl.split('/').pop()!, boardUrl, engineer };
}
