import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { mkdtempSync, readdirSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
// @ts-expect-error: s3rver ships no type declarations
import S3rver from 's3rver';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { makeOrg, siteWithMachine } from '../helpers/register';
import type { Client } from '../helpers/http';
import {
	HTML_FILE,
	SVG_FILE,
	hasGpsIfd,
	jpeg,
	pdfDrawing,
	pixel,
	png,
	pngHeaderClaiming,
	sidewaysJpegWithGps,
	webp
} from '../helpers/images';

function upload(c: Client, machineId: string, bytes: Buffer, filename: string, type: string, extra: Record<string, string> = {}) {
	const form = new FormData();
	form.set('file', new Blob([new Uint8Array(bytes)], { type }), filename);
	for (const [k, v] of Object.entries(extra)) form.set(k, v);
	return c.request(`/api/v1/machines/${machineId}/media`, { method: 'POST', body: form, headers: { accept: 'application/json' } });
}

function filesUnder(dir: string): string[] {
	if (!existsSync(dir)) return [];
	return readdirSync(dir, { recursive: true, withFileTypes: true })
		.filter((d) => d.isFile())
		.map((d) => join(d.parentPath, d.name));
}

// The same behaviour on local disk and on an S3-compatible store (an in-process fake S3).
describe.each(['disk', 's3'] as const)('media uploads on %s storage', (kind) => {
	let t: TestDatabase;
	let app: RunningApp;
	let s3: { close(): Promise<void> } | null = null;
	let s3Dir = '';
	let dataDir = '';
	let a: Awaited<ReturnType<typeof makeOrg>>['clients'];
	let b: Awaited<ReturnType<typeof makeOrg>>['clients'];
	let machineId: string;

	const mediaRows = () => t.db.selectFrom('media').selectAll().where('machine_id', '=', machineId).execute();
	// The fake S3 keeps each object as "<key>._S3rver_object" beside its metadata files.
	const storedFiles = () =>
		kind === 'disk' ? filesUnder(join(dataDir, 'media')) : filesUnder(s3Dir).filter((f) => f.endsWith('._S3rver_object'));

	beforeAll(async () => {
		t = await createTestDatabase();
		dataDir = mkdtempSync(join(tmpdir(), 'spotface-media-'));
		const env: Record<string, string> = { MEDIA_MAX_PIXELS: '10000000' };
		if (kind === 's3') {
			s3Dir = mkdtempSync(join(tmpdir(), 'spotface-s3-'));
			const server = new S3rver({
				port: 0,
				address: '127.0.0.1',
				silent: true,
				directory: s3Dir,
				configureBuckets: [{ name: 'spotface-media' }]
			});
			const { port } = await server.run();
			s3 = server;
			Object.assign(env, {
				S3_BUCKET: 'spotface-media',
				S3_ENDPOINT: `http://127.0.0.1:${port}`,
				S3_REGION: 'us-east-1',
				S3_ACCESS_KEY_ID: 'S3RVER',
				S3_SECRET_ACCESS_KEY: 'S3RVER',
				S3_FORCE_PATH_STYLE: 'true'
			});
		}
		app = await startApp({ databaseUrl: t.url, dataDir, env });
		a = (await makeOrg(t, app.url, `Cedar ${kind}`)).clients;
		b = (await makeOrg(t, app.url, `Damson ${kind}`, ['admin'])).clients;
		machineId = (await siteWithMachine(a.admin)).machine.id;
	});
	afterAll(async () => {
		await app?.stop();
		await s3?.close();
		await t?.drop();
	});

	it('stores good JPEG, PNG and WebP photos with a display image and a thumbnail', async () => {
		for (const [bytes, name, mime] of [
			[await jpeg(1600, 1200), 'pump.jpg', 'image/jpeg'],
			[await png(900, 600), 'sketch.png', 'image/png'],
			[await webp(640, 480), 'motor.webp', 'image/webp']
		] as const) {
			const r = await upload(a.technician, machineId, bytes, name, mime);
			const body = await r.json();
			expect(r.status, JSON.stringify(body)).toBe(201);
			expect(body).toMatchObject({ mimeType: mime, originalFilename: name, kind: 'photo', machineId });
			const display = await a.viewer.get(body.displayUrl, {});
			expect(display.status).toBe(200);
			expect(display.headers.get('content-type')).toBe(mime);
			const meta = await sharp(Buffer.from(await display.arrayBuffer())).metadata();
			expect([meta.width, meta.height]).toEqual([body.width, body.height]);
			const thumb = await a.viewer.get(body.thumbUrl, {});
			expect(thumb.headers.get('content-type')).toBe('image/webp');
			const tm = await sharp(Buffer.from(await thumb.arrayBuffer())).metadata();
			expect(Math.max(tm.width!, tm.height!)).toBe(480);
		}
		const list = await (await a.viewer.json('GET', `/api/v1/machines/${machineId}/media`)).json();
		expect(list.total).toBe(3);
		expect(storedFiles().length).toBe(9);
	});

	it('a PNG named .jpg is stored as PNG', async () => {
		const r = await upload(a.technician, machineId, await png(300, 200), 'photo.jpg', 'image/jpeg');
		const body = await r.json();
		expect(r.status).toBe(201);
		expect(body.mimeType).toBe('image/png');
		const row = await t.db.selectFrom('media').selectAll().where('id', '=', body.id).executeTakeFirstOrThrow();
		expect(row.original_key).toMatch(/original\.png$/);
		expect(row.display_mime_type).toBe('image/png');
		const display = await a.viewer.get(body.displayUrl, {});
		expect(display.headers.get('content-type')).toBe('image/png');
	});

	it('refuses a truncated JPEG, an SVG, an HTML file named .png and an oversized picture, storing nothing', async () => {
		const rowsBefore = (await mediaRows()).length;
		const filesBefore = storedFiles().length;
		const full = await jpeg(1200, 900);
		const cases: Array<[Buffer, string, string, number, RegExp]> = [
			[full.subarray(0, Math.floor(full.length * 0.6)), 'cut.jpg', 'image/jpeg', 422, /damaged or incomplete/],
			[SVG_FILE, 'drawing.svg', 'image/svg+xml', 415, /SVG/],
			[HTML_FILE, 'innocent.png', 'image/png', 415, /HTML page/],
			// 4000 × 3000 = 12 MP against the 10 MP limit this app runs with.
			[await png(4000, 3000), 'huge.png', 'image/png', 422, /4000 × 3000 pixels .* limit is 10 megapixels/],
			// A decompression bomb's shape: a tiny file whose header claims 60 000 × 60 000 pixels.
			[pngHeaderClaiming(60000, 60000), 'bomb.png', 'image/png', 422, /60000 × 60000 pixels/]
		];
		for (const [bytes, name, mime, status, message] of cases) {
			const r = await upload(a.technician, machineId, bytes, name, mime);
			const body = await r.json();
			expect(r.status, name).toBe(status);
			expect(r.headers.get('content-type')).toContain('application/problem+json');
			expect(body.detail, name).toMatch(message);
		}
		expect((await mediaRows()).length).toBe(rowsBefore);
		expect(storedFiles().length).toBe(filesBefore);
	});

	it('serves an EXIF orientation 6 photo upright, without GPS or any EXIF', async () => {
		const input = await sidewaysJpegWithGps(600, 400);
		expect((await sharp(input).metadata()).orientation).toBe(6);
		expect(hasGpsIfd((await sharp(input).metadata()).exif)).toBe(true);
		const r = await upload(a.technician, machineId, input, 'side.jpg', 'image/jpeg');
		const body = await r.json();
		expect([body.width, body.height]).toEqual([400, 600]);
		for (const url of [body.displayUrl, body.thumbUrl]) {
			const served = Buffer.from(await (await a.viewer.get(url, {})).arrayBuffer());
			const meta = await sharp(served).metadata();
			expect(meta.height!).toBeGreaterThan(meta.width!);
			expect(meta.orientation).toBeUndefined();
			expect(meta.exif).toBeUndefined();
			expect(hasGpsIfd(meta.exif)).toBe(false);
			expect(served.includes(Buffer.from('Test camera'))).toBe(false);
		}
		const served = Buffer.from(await (await a.viewer.get(body.displayUrl, {})).arrayBuffer());
		// The red marker stored top-left is top-right once upright.
		const [r1, g1] = await pixel(served, 390, 10);
		expect(r1).toBeGreaterThan(200);
		expect(g1).toBeLessThan(60);
	});

	it('turns the first page of a PDF drawing into an image', async () => {
		const r = await upload(a.engineer, machineId, pdfDrawing(), 'ga-drawing.pdf', 'application/pdf');
		const body = await r.json();
		expect(r.status, JSON.stringify(body)).toBe(201);
		expect(body).toMatchObject({ kind: 'drawing', mimeType: 'application/pdf' });
		const display = await a.viewer.get(body.displayUrl, {});
		expect(display.headers.get('content-type')).toBe('image/png');
	});

	it('serves with ETag and cache headers, and answers 304 to a matching If-None-Match', async () => {
		const body = await (await upload(a.technician, machineId, await jpeg(320, 240), 'e.jpg', 'image/jpeg')).json();
		const first = await a.viewer.get(body.displayUrl, {});
		const etag = first.headers.get('etag')!;
		expect(etag).toMatch(/^"[0-9a-f]{32}-d"$/);
		expect(first.headers.get('cache-control')).toContain('private');
		expect(first.headers.get('cache-control')).toContain('max-age=');
		const again = await a.viewer.get(body.displayUrl, { 'if-none-match': etag });
		expect(again.status).toBe(304);
		expect(await again.text()).toBe('');
	});

	it('another organisation gets 404 for the media and its images', async () => {
		const body = await (await upload(a.technician, machineId, await jpeg(320, 240), 'x.jpg', 'image/jpeg')).json();
		for (const path of [`/api/v1/media/${body.id}`, body.displayUrl, body.thumbUrl, `/api/v1/machines/${machineId}/media`]) {
			expect((await b.admin.get(path, { accept: 'application/json' })).status, path).toBe(404);
		}
		expect((await upload(b.admin, machineId, await jpeg(100, 100), 'y.jpg', 'image/jpeg')).status).toBe(404);
		expect((await b.admin.json('DELETE', `/api/v1/media/${body.id}`)).status).toBe(404);
	});

	it('roles: viewers cannot upload; technicians archive only their own uploads', async () => {
		expect((await upload(a.viewer, machineId, await jpeg(100, 100), 'v.jpg', 'image/jpeg')).status).toBe(403);
		const mine = await (await upload(a.technician, machineId, await jpeg(100, 100), 'mine.jpg', 'image/jpeg')).json();
		const theirs = await (await upload(a.engineer, machineId, await jpeg(100, 100), 'theirs.jpg', 'image/jpeg')).json();
		expect((await a.technician.json('DELETE', `/api/v1/media/${theirs.id}`)).status).toBe(403);
		const archived = await a.technician.json('DELETE', `/api/v1/media/${mine.id}`);
		expect(archived.status).toBe(200);
		// Archived media leave the list and stay readable by id (a board may show them).
		const list = await (await a.viewer.json('GET', `/api/v1/machines/${machineId}/media?perPage=200`)).json();
		expect(list.items.map((m: { id: string }) => m.id)).not.toContain(mine.id);
		expect((await a.viewer.get(mine.displayUrl, {})).status).toBe(200);
	});
});
