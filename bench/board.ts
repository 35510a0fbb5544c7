// Board at scale, in the browser: a board with 1,000 points, 50 cable routes and a few keep-out
// zones on a machine photo, opened in Debian's Chromium (playwright-core, headless, no GPU, as
// the browser tests run it). Prints:
//   - time from navigation to the first point drawn on the canvas (cold: fresh browser profile;
//     warm: the same page opened again), from the renderer's 'spotface:board-drawn' mark;
//   - frame times during a scripted pan (drags) and zoom (wheel steps): the gaps between
//     requestAnimationFrame callbacks, median and p95, and the long tasks (> 50 ms) meanwhile.
//
// It runs on a private PostgreSQL cluster of its own (.data/pg-bench-board, port
// SPOTFACE_BENCH_PG_PORT or 54379, a fresh database each run, stopped at the end) and the built
// app (run `npx vite build` first when the code changed; it builds when build/ is missing).
//
//   npx tsx bench/board.ts [--points 1000] [--routes 50] [--zones 8] [--width 1280] [--height 800]
//                          [--rounds 2] [--profile out.cpuprofile] [--profile-open out.cpuprofile] [--trace out.json]
//                          [--trace-open out.json] [--profile-cold out.cpuprofile]
//
// --profile writes a CPU profile of one pan-and-zoom round (open it in Chromium's DevTools) and
// prints the functions with the most self time; --trace writes a Chromium performance trace of it;
// --profile-open profiles opening the board a second time; --trace-open writes a Chromium
// performance trace of the first (cold) opening and, beside it (name.warm.json), of the second
// (warm): network, script compiling and running, drawing;
// --profile-cold writes a CPU profile of that opening.
import { writeFileSync } from 'node:fs';
import { cpus, freemem, loadavg, totalmem } from 'node:os';
import { parseArgs } from 'node:util';
import sharp from 'sharp';
import * as Y from 'yjs';
import { chromium, type Page } from 'playwright-core';
import { openBenchDatabase } from './private-db';
import { startApp, type RunningApp } from '../tests/helpers/app';
import { Client } from '../tests/helpers/http';
import { hashPassword } from '../src/lib/server/auth/password';
import { addPoint, addRoute, addZone, setScale } from '../src/lib/board/model';
import { MATERIALS, MOUNTINGS, SURFACES } from '../src/lib/trade';

const { values: args } = parseArgs({
	options: {
		points: { type: 'string', default: '1000' },
		routes: { type: 'string', default: '50' },
		zones: { type: 'string', default: '8' },
		width: { type: 'string', default: '1280' },
		height: { type: 'string', default: '800' },
		rounds: { type: 'string', default: '2' },
		profile: { type: 'string' },
		'profile-open': { type: 'string' },
		'trace-open': { type: 'string' },
		'profile-cold': { type: 'string' },
		trace: { type: 'string' }
	}
});
const POINTS = Number(args.points);
const ROUTES = Number(args.routes);
const ZONES = Number(args.zones);
const WIDTH = Number(args.width);
const HEIGHT = Number(args.height);
const ROUNDS = Number(args.rounds);
if (![POINTS, ROUTES, ZONES, WIDTH, HEIGHT, ROUNDS].every((n) => Number.isInteger(n) && n >= 0) || ROUTES > POINTS || ROUNDS < 1) {
	console.error('usage: npx tsx bench/board.ts [--points N] [--routes N≤points] [--zones N] [--width px] [--height px] [--rounds N≥1]');
	process.exit(2);
}

const PASSWORD = 'board bench pass 1';
const PHOTO_W = 2400;
const PHOTO_H = 1600;
const MARK = 'spotface:board-drawn';

function percentile(sorted: number[], p: number) {
	if (sorted.length === 0) return NaN;
	return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
}
const median = (sorted: number[]) => percentile(sorted, 50);
const ms = (n: number) => `${n.toFixed(1)} ms`;

/** A deterministic pseudo-random sequence, so every run draws the same board. */
function random(seed: number) {
	let s = seed >>> 0;
	return () => {
		s = (s + 0x6d2b79f5) >>> 0;
		let t = s;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

async function photo(): Promise<Buffer> {
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${PHOTO_W}" height="${PHOTO_H}">
		<rect width="100%" height="100%" fill="#8a949c"/>
		<rect x="300" y="420" width="1100" height="700" rx="60" fill="#3f5566"/>
		<rect x="1400" y="640" width="700" height="220" fill="#5b6b77"/>
		<circle cx="850" cy="770" r="220" fill="#2d3f4c"/>
	</svg>`;
	return sharp(Buffer.from(svg)).jpeg({ quality: 85 }).toBuffer();
}

/** The board's content: points spread over the photo, routes from the first points, zones. */
function boardDocument(): Uint8Array {
	const rnd = random(20261202);
	const doc = new Y.Doc();
	const pick = <T>(list: readonly T[]) => list[Math.floor(rnd() * list.length)];
	doc.transact(() => {
		setScale(doc, { a: [100, 1500], b: [700, 1500], lengthMm: 600 });
		for (let i = 0; i < ZONES; i++) {
			const x = 200 + rnd() * (PHOTO_W - 600);
			const y = 200 + rnd() * (PHOTO_H - 600);
			const w = 120 + rnd() * 250;
			const h = 100 + rnd() * 200;
			addZone(doc, {
				polygon: [
					[x, y],
					[x + w, y],
					[x + w, y + h],
					[x, y + h]
				],
				kind: pick(['shaft', 'coupling', 'belt', 'fan'] as const)
			});
		}
		const ids: string[] = [];
		for (let i = 0; i < POINTS; i++) {
			ids.push(
				addPoint(doc, {
					x: 20 + rnd() * (PHOTO_W - 40),
					y: 20 + rnd() * (PHOTO_H - 40),
					label: `P${i + 1}`,
					component: pick(['motor DE bearing housing', 'motor NDE bearing housing', 'pump DE bearing housing', 'gearbox input']),
					surface: rnd() < 0.15 ? null : pick(SURFACES),
					mounting: rnd() < 0.2 ? null : pick(MOUNTINGS),
					material: pick(MATERIALS),
					flatDiameterMm: Math.round(15 + rnd() * 30),
					wallThicknessMm: Math.round(4 + rnd() * 20),
					distanceToBearingMm: rnd() < 0.3 ? null : Math.round(10 + rnd() * 150),
					surfaceTempC: Math.round(25 + rnd() * 60),
					createdBy: 'Bench Technician'
				})
			);
		}
		for (let i = 0; i < ROUTES; i++) {
			const start = maps0(doc, ids[i]);
			const vertices: Array<[number, number]> = [start];
			const n = 2 + Math.floor(rnd() * 4);
			for (let k = 0; k < n; k++) {
				const [px, py] = vertices[vertices.length - 1];
				vertices.push([
					Math.min(PHOTO_W - 5, Math.max(5, px + (rnd() - 0.5) * 500)),
					Math.min(PHOTO_H - 5, Math.max(5, py + (rnd() - 0.5) * 400))
				]);
			}
			addRoute(doc, { pointId: ids[i], vertices, crossSectionMm2: pick([0.5, 0.75, 1, 1.5]), exitLabel: `JB-${1 + (i % 6)}` });
		}
	});
	return Y.encodeStateAsUpdate(doc);
}

function maps0(doc: Y.Doc, id: string): [number, number] {
	const m = doc.getMap<Y.Map<unknown>>('points').get(id)!;
	return [m.get('x') as number, m.get('y') as number];
}

async function expectStatus(res: Response, status: number, what: string) {
	if (res.status !== status) throw new Error(`${what}: ${res.status} ${await res.text()}`);
	return res;
}

/** Organisation, engineer, register entries, photo, survey and board, through the app's API and pages. */
async function setUp(bench: Awaited<ReturnType<typeof openBenchDatabase>>, app: RunningApp) {
	const db = bench.handle.db;
	const org = await db
		.insertInto('organisation')
		.values({ name: 'Harrowgate Water Services (bench)' })
		.returning('id')
		.executeTakeFirstOrThrow();
	const hash = await hashPassword(PASSWORD);
	const people = [
		{ id: 'u-bench-admin', email: 'admin@bench.example', name: 'Bench Admin', role: 'admin' as const },
		{ id: 'u-bench-eng', email: 'engineer@bench.example', name: 'Bench Engineer', role: 'engineer' as const }
	];
	for (const p of people) {
		await db.insertInto('app_user').values({ id: p.id, email: p.email, name: p.name, password_hash: hash }).execute();
		await db.insertInto('member').values({ organisation_id: org.id, user_id: p.id, role: p.role }).execute();
	}
	const admin = new Client(app.url);
	await admin.signIn('admin@bench.example', PASSWORD);
	const post = async <T>(path: string, body: unknown) =>
		(await (await expectStatus(await admin.json('POST', path, body), 201, path)).json()) as T;
	const site = await post<{ id: string }>('/api/v1/sites', { name: 'Lower Works' });
	const area = await post<{ id: string }>('/api/v1/areas', { siteId: site.id, name: 'Pump hall' });
	await post('/api/v1/supply-points', { areaId: area.id, name: 'Junction box', tag: 'JB-1', voltageV: 24 });
	const machine = await post<{ id: string }>('/api/v1/machines', {
		siteId: site.id,
		areaId: area.id,
		name: 'Raw water pump 4',
		tag: 'P-104',
		kind: 'pump',
		speedRpm: 1480,
		powerKw: 90,
		foundation: 'rigid'
	});
	const form = new FormData();
	form.set('file', new Blob([new Uint8Array(await photo())], { type: 'image/jpeg' }), 'pump.jpg');
	form.set('kind', 'photo');
	const media = (await (
		await expectStatus(await admin.request(`/api/v1/machines/${machine.id}/media`, { method: 'POST', body: form }), 201, 'photo upload')
	).json()) as { id: string };

	const engineer = new Client(app.url);
	await engineer.signIn('engineer@bench.example', PASSWORD);
	const plan = await engineer.request('/surveys/new', {
		method: 'POST',
		headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
		body: new URLSearchParams([
			['siteId', site.id],
			['title', 'Pump hall walk (bench)'],
			['plannedDate', '2026-04-14'],
			['notes', ''],
			['machineId', machine.id],
			['engineerId', 'u-bench-eng']
		]).toString()
	});
	await expectStatus(plan, 303, 'plan the survey');
	const surveyPath = plan.headers.get('location')!;
	const start = await expectStatus(
		await engineer.form(`${surveyPath}?/board`, { machineId: machine.id, mediaId: media.id }),
		303,
		'start the board'
	);
	const boardPath = start.headers.get('location')!;
	const boardId = boardPath.split('/').pop()!;
	// The content goes in as the board's stored snapshot, as compaction leaves a busy board.
	await db
		.updateTable('board')
		.set({ snapshot: Buffer.from(boardDocument()) })
		.where('id', '=', boardId)
		.execute();
	return { boardUrl: app.url + boardPath };
}

const BROWSER_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking'];

async function signIn(page: Page, base: string) {
	await page.goto(`${base}/sign-in`);
	await page.getByLabel('E-mail').fill('engineer@bench.example');
	await page.getByLabel('Password').fill(PASSWORD);
	await Promise.all([page.waitForURL((u) => !u.pathname.startsWith('/sign-in')), page.getByRole('button', { name: 'Sign in' }).click()]);
}

/** Navigation start to the renderer's first frame with points on it, ms. */
async function openBoard(page: Page, url: string): Promise<{ firstPointMs: number; points: number; steps: string }> {
	await page.goto(url);
	const handle = await page.waitForFunction(
		(mark) => {
			const e = performance.getEntriesByName(mark)[0];
			if (e) return { at: e.startTime, points: Number((e as PerformanceMark).detail?.points ?? 0) };
			// Without the mark (an older renderer): the frame after the canvas holds points.
			const n = Number(document.querySelector<HTMLElement>('[data-testid=board-canvas]')?.dataset.points ?? 0);
			const konva = (window as unknown as { Konva?: { stages: Array<{ find(s: string): unknown[] }> } }).Konva;
			return n > 0 && (konva?.stages[0]?.find('Text').length ?? 0) > 0 ? { at: performance.now(), points: n } : null;
		},
		MARK,
		{ timeout: 60_000, polling: 'raf' }
	);
	const r = (await handle.jsonValue()) as { at: number; points: number };
	const steps = (await page.evaluate(`(() => {
		const n = performance.getEntriesByType('navigation')[0];
		const marks = performance.getEntriesByType('mark').filter((m) => m.name.startsWith('spotface:')).map((m) => [m.name.slice(9), Math.round(m.startTime)]);
		return [['html', Math.round(n.responseEnd)], ['dom', Math.round(n.domContentLoadedEventEnd)], ...marks];
	})()`)) as Array<[string, number]>;
	return { firstPointMs: r.at, points: r.points, steps: steps.map(([k, v]) => `${k} ${v}`).join(' · ') };
}

// In-page code goes in as text: tsx would wrap named functions in a helper the page lacks.
const FRAME_LOG = `(() => {
	const w = window;
	w.__frames = [];
	w.__long = [];
	w.__run = true;
	let last = performance.now();
	const loop = (t) => {
		w.__frames.push(t - last);
		last = t;
		if (w.__run) requestAnimationFrame(loop);
	};
	requestAnimationFrame((t) => {
		last = t;
		requestAnimationFrame(loop);
	});
	w.__obs = new PerformanceObserver((list) => {
		for (const e of list.getEntries()) w.__long.push(e.duration);
	});
	w.__obs.observe({ type: 'longtask' });
})()`;

/** Records rAF gaps and long tasks in the page until `stopFrameLog`. */
async function startFrameLog(page: Page) {
	await page.evaluate(FRAME_LOG);
}

async function stopFrameLog(page: Page) {
	return page.evaluate(() => {
		const w = window as unknown as { __frames: number[]; __long: number[]; __run: boolean; __obs?: PerformanceObserver };
		w.__run = false;
		w.__obs?.disconnect();
		return { frames: w.__frames.slice(), long: w.__long.slice() };
	});
}

/** Pans with drags on the canvas and zooms with wheel steps, about as fast as a hand does. */
async function panAndZoom(page: Page) {
	const box = (await page.getByTestId('board-canvas').boundingBox())!;
	const cx = box.x + box.width / 2;
	const cy = box.y + box.height / 2;
	await page.mouse.move(cx, cy);
	// Zoom in towards the middle, pan around, zoom back out.
	for (let i = 0; i < 12; i++) await page.mouse.wheel(0, -100);
	for (const [dx, dy] of [
		[300, 0],
		[0, 200],
		[-500, -100],
		[200, -200]
	]) {
		await page.mouse.move(cx, cy);
		await page.mouse.down({ button: 'middle' });
		await page.mouse.move(cx + dx, cy + dy, { steps: 30 });
		await page.mouse.up({ button: 'middle' });
	}
	for (let i = 0; i < 12; i++) await page.mouse.wheel(0, 100);
	// At the whole-photo zoom: pan with every point in view.
	await page.mouse.move(cx, cy);
	await page.mouse.down({ button: 'middle' });
	await page.mouse.move(cx + 200, cy + 120, { steps: 30 });
	await page.mouse.move(cx, cy, { steps: 30 });
	await page.mouse.up({ button: 'middle' });
}

function summarise(frames: number[], long: number[]) {
	// The first gap covers the start of logging; drop it.
	const f = frames.slice(1).sort((a, b) => a - b);
	const total = frames.slice(1).reduce((s, x) => s + x, 0);
	return {
		frames: f.length,
		median: median(f),
		p95: percentile(f, 95),
		max: f[f.length - 1] ?? NaN,
		longCount: long.length,
		longMs: long.reduce((s, x) => s + x, 0),
		totalMs: total
	};
}

/** Top self-time functions of a CPU profile. */
function topFunctions(profile: {
	nodes: Array<{ id: number; callFrame: { functionName: string; url: string; lineNumber: number } }>;
	samples: number[];
	timeDeltas: number[];
}) {
	const self = new Map<number, number>();
	profile.samples.forEach((id, i) => self.set(id, (self.get(id) ?? 0) + (profile.timeDeltas[i] ?? 0)));
	const byName = new Map<string, number>();
	for (const n of profile.nodes) {
		const t = self.get(n.id) ?? 0;
		if (!t) continue;
		const file = n.callFrame.url.split('/').pop() ?? '';
		const name = `${n.callFrame.functionName || '(anonymous)'} ${file}:${n.callFrame.lineNumber + 1}`;
		byName.set(name, (byName.get(name) ?? 0) + t);
	}
	return [...byName].sort((a, b) => b[1] - a[1]).slice(0, 25);
}

async function main() {
	const load0 = loadavg();
	console.log(
		`machine: ${cpus().length} CPUs (${cpus()[0]?.model ?? '?'}), ${(totalmem() / 2 ** 30).toFixed(1)} GiB memory (${(freemem() / 2 ** 30).toFixed(1)} GiB free), load average ${load0.map((x) => x.toFixed(2)).join(' ')}`
	);
	console.log(
		`board benchmark: ${POINTS} points, ${ROUTES} routes, ${ZONES} keep-out zones on a ${PHOTO_W} × ${PHOTO_H} photo; viewport ${WIDTH} × ${HEIGHT}; Chromium headless, no GPU`
	);
	const bench = await openBenchDatabase({ dir: '.data/pg-bench-board', defaultPort: 54379, name: 'spotface_bench_board' });
	let app: RunningApp | null = null;
	const browser = await chromium.launch({ executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium', args: BROWSER_ARGS });
	try {
		app = await startApp({ databaseUrl: bench.url });
		const { boardUrl } = await setUp(bench, app);

		const opens: Array<{ kind: string; ms: number; points: number; steps: string }> = [];
		const rounds: Array<ReturnType<typeof summarise>> = [];
		for (let r = 0; r < ROUNDS; r++) {
			// A fresh profile each round: no cached files, no offline copy of the board.
			const context = await browser.newContext({ viewport: { width: WIDTH, height: HEIGHT } });
			const page = await context.newPage();
			const errors: string[] = [];
			page.on('pageerror', (e) => errors.push(e.message));
			await signIn(page, app.url);
			const traceOpen = args['trace-open'] && r === 0;
			if (traceOpen) await browser.startTracing(page, { path: args['trace-open'], screenshots: false });
			const coldCdp = args['profile-cold'] && r === 0 ? await context.newCDPSession(page) : null;
			if (coldCdp) {
				await coldCdp.send('Profiler.enable');
				await coldCdp.send('Profiler.setSamplingInterval', { interval: 200 });
				await coldCdp.send('Profiler.start');
			}
			const cold = await openBoard(page, boardUrl);
			if (coldCdp) {
				const { profile } = (await coldCdp.send('Profiler.stop')) as { profile: Parameters<typeof topFunctions>[0] };
				writeFileSync(args['profile-cold']!, JSON.stringify(profile));
				console.log(`CPU profile of opening the board (cold) written to ${args['profile-cold']}; most self time:`);
				for (const [name, t] of topFunctions(profile)) console.log(`  ${(t / 1000).toFixed(1).padStart(8)} ms  ${name}`);
			}
			if (traceOpen) {
				await browser.stopTracing();
				console.log(`trace of opening the board (cold) written to ${args['trace-open']}`);
			}
			opens.push({ kind: 'cold', ms: cold.firstPointMs, points: cold.points, steps: cold.steps });
			const openCdp = args['profile-open'] && r === 0 ? await context.newCDPSession(page) : null;
			if (openCdp) {
				await openCdp.send('Profiler.enable');
				await openCdp.send('Profiler.setSamplingInterval', { interval: 200 });
				await openCdp.send('Profiler.start');
			}
			const warmTrace = traceOpen ? args['trace-open']!.replace(/(\.json)?$/, '.warm.json') : null;
			if (warmTrace) await browser.startTracing(page, { path: warmTrace, screenshots: false });
			const warm = await openBoard(page, boardUrl);
			if (warmTrace) {
				await browser.stopTracing();
				console.log(`trace of opening the board (warm) written to ${warmTrace}`);
			}
			if (openCdp) {
				const { profile } = (await openCdp.send('Profiler.stop')) as { profile: Parameters<typeof topFunctions>[0] };
				writeFileSync(args['profile-open']!, JSON.stringify(profile));
				console.log(`CPU profile of opening the board (warm) written to ${args['profile-open']}; most self time:`);
				for (const [name, t] of topFunctions(profile)) console.log(`  ${(t / 1000).toFixed(1).padStart(8)} ms  ${name}`);
			}
			opens.push({ kind: 'warm', ms: warm.firstPointMs, points: warm.points, steps: warm.steps });
			await page.waitForTimeout(1500); // let the board settle (sync, offline copy)

			const profiling = r === ROUNDS - 1 && (args.profile || args.trace);
			const cdp = profiling ? await context.newCDPSession(page) : null;
			if (cdp && args.profile) {
				await cdp.send('Profiler.enable');
				await cdp.send('Profiler.setSamplingInterval', { interval: 200 });
				await cdp.send('Profiler.start');
			}
			if (profiling && args.trace) await browser.startTracing(page, { path: args.trace, screenshots: false });
			await startFrameLog(page);
			await panAndZoom(page);
			const log = await stopFrameLog(page);
			if (profiling && args.trace) await browser.stopTracing();
			if (cdp && args.profile) {
				const { profile } = (await cdp.send('Profiler.stop')) as { profile: Parameters<typeof topFunctions>[0] };
				writeFileSync(args.profile, JSON.stringify(profile));
				console.log(`CPU profile written to ${args.profile}; most self time:`);
				for (const [name, t] of topFunctions(profile)) console.log(`  ${(t / 1000).toFixed(1).padStart(8)} ms  ${name}`);
			}
			rounds.push(summarise(log.frames, log.long));
			if (errors.length) console.log(`page errors: ${errors.join(' | ')}`);
			await context.close();
		}

		console.log('\nnavigation to first point drawn:');
		for (const o of opens)
			console.log(`  ${o.kind.padEnd(5)} ${ms(o.ms)} (${o.points} points in the first frame; ms from navigation: ${o.steps})`);
		console.log('\npan and zoom (requestAnimationFrame gaps):');
		rounds.forEach((s, i) =>
			console.log(
				`  round ${i + 1}: ${s.frames} frames in ${ms(s.totalMs)}; median ${ms(s.median)}, p95 ${ms(s.p95)}, max ${ms(s.max)}; long tasks ${s.longCount} (${ms(s.longMs)})`
			)
		);
		const load1 = loadavg();
		console.log(`\nload average at the end: ${load1.map((x) => x.toFixed(2)).join(' ')}`);
	} finally {
		await browser.close();
		await app?.stop();
		await bench.close();
	}
}

main().catch((e) => {
	console.error(e);
	process.exit(1);
});
