// Sync benchmark: the reference Yjs WebSocket server (@y/websocket-server, in memory, no storage)
// and Spotface (the built app with PostgreSQL), one after the other in one run, each in a child
// process of its own, driven by the same harness: `--boards` boards × `--clients` clients, each
// client editing its own point (a move and a note) at every rate of `--rates` edits/s (Poisson
// gaps). Per server and rate it prints:
//   - peer delivery: edit → arrival at each other client of the board, p50 / p99 (ms);
//   - the writer's acknowledgement (Spotface: "stored", i.e. committed; the reference has none);
//   - CPU of the server process (user + system from /proc, what process.cpuUsage reports inside
//     it) and of the PostgreSQL cluster (every process of the benchmark's own cluster);
//   - memory (server RSS, peak during the step), stored bytes per update (the log rows' size and
//     the WAL PostgreSQL wrote per update);
// then the rate at which p99 first passes 50 ms, and the cold load of a compacted board of
// `--cold` updates (Spotface: joined from storage by a fresh process's room; the reference: a
// client's first sync of a room held in memory).
//
// Runs on a private PostgreSQL cluster (.data/pg-sync, port SPOTFACE_BENCH_PG_PORT or 54369, a
// fresh database each run, stopped at the end). Hold the build lock, as the tests do:
//   flock /tmp/build.lock npm run bench:sync -- [--seconds 20] [--warmup 3] [--rates 0.5,2,8] [--boards 20] [--clients 6] [--cold 10000] [--only reference|spotface] [--profile dir]
import { readFileSync, readdirSync } from 'node:fs';
import { spawn, type ChildProcess } from 'node:child_process';
import { parseArgs } from 'node:util';
import { cpus, loadavg, totalmem } from 'node:os';
import { sql } from 'kysely';
import * as Y from 'yjs';
import * as encoding from 'lib0/encoding';
import * as decoding from 'lib0/decoding';
import * as syncProtocol from 'y-protocols/sync';
import WebSocket from 'ws';
import { openBenchDatabase } from './private-db';
import { startApp, type RunningApp } from '../tests/helpers/app';
import { createBoardFixture, openProvider, sessionCookie, waitFor } from '../tests/helpers/collab';
import { addPoint, maps, movePoint, updatePoint, LOCAL_ORIGIN } from '../src/lib/board/model';
import { compact } from '../src/lib/server/collab/persistence';
import type { BoardProvider } from '../src/lib/board/sync/provider';

const { values: args } = parseArgs({
	options: {
		seconds: { type: 'string', default: '20' },
		warmup: { type: 'string', default: '3' },
		rates: { type: 'string', default: '0.5,2,8' },
		boards: { type: 'string', default: '20' },
		clients: { type: 'string', default: '6' },
		cold: { type: 'string', default: '10000' },
		only: { type: 'string' },
		// Writes a CPU profile of the Spotface server to this folder (node --cpu-prof).
		profile: { type: 'string' }
	}
});
const SECONDS = Number(args.seconds);
const WARMUP = Number(args.warmup);
const RATES = args.rates.split(',').map(Number);
const BOARDS = Number(args.boards);
const CLIENTS = Number(args.clients);
const COLD = Number(args.cold);
if (![SECONDS, WARMUP, BOARDS, CLIENTS, COLD, ...RATES].every((n) => Number.isFinite(n) && n >= 0) || CLIENTS < 2) {
	console.error(
		'usage: npm run bench:sync -- [--seconds N] [--warmup N] [--rates a,b,c] [--boards N] [--clients N≥2] [--cold N] [--only reference|spotface]'
	);
	process.exit(2);
}

const now = () => performance.now();
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const pct = (sorted: number[], p: number) =>
	sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : NaN;
const load = () =>
	loadavg()
		.map((x) => x.toFixed(2))
		.join(' ');

/** CPU seconds (user + system) of a process, from /proc (clock ticks of 1/100 s). */
function cpuSeconds(pid: number): number {
	try {
		const f = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
		return (Number(f[11]) + Number(f[12])) / 100;
	} catch {
		return 0;
	}
}
function rssMB(pid: number): number {
	const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
	return m ? Number(m[1]) / 1024 : NaN;
}
/** Every process of a PostgreSQL cluster: the postmaster and its children. */
function clusterPids(dataDir: string): number[] {
	const postmaster = Number(readFileSync(`${dataDir}/postmaster.pid`, 'utf8').split('\n')[0]);
	const pids = [postmaster];
	for (const d of readdirSync('/proc')) {
		if (!/^\d+$/.test(d)) continue;
		try {
			const ppid = Number(readFileSync(`/proc/${d}/stat`, 'utf8').split(') ')[1].split(' ')[1]);
			if (ppid === postmaster) pids.push(Number(d));
		} catch {
			/* gone meanwhile */
		}
	}
	return pids;
}

// ---- the reference's client: y-websocket's protocol over a plain WebSocket -----------------
const MESSAGE_SYNC = 0;
class ReferenceClient {
	readonly doc = new Y.Doc();
	readonly ws: WebSocket;
	synced = false;
	constructor(url: string) {
		this.ws = new WebSocket(url);
		this.ws.binaryType = 'nodebuffer';
		this.ws.on('open', () => {
			const e = encoding.createEncoder();
			encoding.writeVarUint(e, MESSAGE_SYNC);
			syncProtocol.writeSyncStep1(e, this.doc);
			this.ws.send(encoding.toUint8Array(e));
		});
		this.ws.on('message', (data: Buffer) => {
			const d = decoding.createDecoder(new Uint8Array(data));
			if (decoding.readVarUint(d) !== MESSAGE_SYNC) return; // presence
			const e = encoding.createEncoder();
			encoding.writeVarUint(e, MESSAGE_SYNC);
			const kind = syncProtocol.readSyncMessage(d, e, this.doc, this);
			if (kind === syncProtocol.messageYjsSyncStep2) this.synced = true;
			if (encoding.length(e) > 1) this.ws.send(encoding.toUint8Array(e));
		});
		this.doc.on('update', (update: Uint8Array, origin: unknown) => {
			if (origin === this || this.ws.readyState !== WebSocket.OPEN) return;
			const e = encoding.createEncoder();
			encoding.writeVarUint(e, MESSAGE_SYNC);
			syncProtocol.writeUpdate(e, update);
			this.ws.send(encoding.toUint8Array(e));
		});
	}
	whenSynced() {
		return waitFor(() => this.synced, 'reference client synced', 60_000);
	}
	destroy() {
		this.ws.close();
		this.doc.destroy();
	}
}

interface Client {
	doc: Y.Doc;
	/** Called with the number of the client's edits not yet acknowledged (Spotface only). */
	onUnacked?(f: (n: number) => void): void;
	destroy(): void | Promise<void>;
}

interface StepResult {
	rate: number;
	edits: number;
	deliveries: number;
	expected: number;
	peer: number[];
	ack: number[];
	serverCpu: number;
	pgCpu: number | null;
	benchCpu: number;
	rssPeak: number;
	walBytesPerUpdate: number | null;
	logBytesPerUpdate: number | null;
}

/** Connects everyone, then runs each rate in turn on the same clients. */
async function runServer(
	name: string,
	pid: number,
	open: (board: number, client: number) => Promise<Client>,
	pg: { dataDir: string; wal: () => Promise<number>; logBytes: () => Promise<number | null> } | null
): Promise<{ connectMs: number; rssIdle: number; steps: StepResult[] }> {
	const connectStart = now();
	const boards: Client[][] = [];
	for (let b = 0; b < BOARDS; b++) boards.push(await Promise.all(Array.from({ length: CLIENTS }, (_, c) => open(b, c))));
	const connectMs = now() - connectStart;
	const own: string[][] = boards.map((clients) => clients.map((p, c) => addPoint(p.doc, { x: 10 + c, y: 10 + c, label: `C${c}` })));
	for (const clients of boards) {
		await waitFor(() => clients.every((p) => maps(p.doc).points.size === CLIENTS), `${name}: every point on every client`, 60_000);
	}
	await sleep(1000);
	const rssIdle = rssMB(pid);

	const sentAt = new Map<string, number>();
	let measuring = false;
	let peer: number[] = [];
	let ack: number[] = [];
	let deliveries = 0;
	boards.forEach((clients) =>
		clients.forEach((p) => {
			maps(p.doc).points.observeDeep((events, txn) => {
				if (txn.local || !measuring) return;
				const t1 = now();
				for (const e of events) {
					if (!(e.target instanceof Y.Map) || !e.keys?.has('notes')) continue;
					const t0 = sentAt.get(e.target.get('notes') as string);
					if (t0 === undefined) continue;
					peer.push(t1 - t0);
					deliveries++;
				}
			});
		})
	);
	// Acknowledgements: each client's edits are acknowledged in order; when the count of
	// unacknowledged edits drops, the oldest ones were stored.
	const pendingAcks: number[][] = boards.flatMap((clients) => clients.map(() => []));
	boards.flat().forEach((p, i) =>
		p.onUnacked?.((n) => {
			const q = pendingAcks[i];
			const t1 = now();
			while (q.length > n) {
				const t0 = q.shift()!;
				if (measuring) ack.push(t1 - t0);
			}
		})
	);

	const steps: StepResult[] = [];
	let seq = 0;
	for (const rate of RATES) {
		let running = true;
		let edits = 0;
		const loops = boards.flatMap((clients, b) =>
			clients.map(async (p, c) => {
				await sleep(Math.random() * (1000 / rate));
				const idx = b * CLIENTS + c;
				while (running) {
					const key = `bench:${b}:${c}:${seq++}`;
					sentAt.set(key, now());
					if (measuring) edits++;
					if (p.onUnacked) pendingAcks[idx].push(now());
					p.doc.transact(() => {
						movePoint(p.doc, own[b][c], 10 + Math.random() * 1000, 10 + Math.random() * 700);
						updatePoint(p.doc, own[b][c], { notes: key });
					}, LOCAL_ORIGIN);
					await sleep((-Math.log(1 - Math.random()) * 1000) / rate);
				}
			})
		);
		await sleep(WARMUP * 1000);
		peer = [];
		ack = [];
		deliveries = 0;
		// PostgreSQL: per process, what each used while measuring (a process that started
		// meanwhile counts from zero; one that ended meanwhile is not counted).
		const pg0 = new Map((pg ? clusterPids(pg.dataDir) : []).map((x) => [x, cpuSeconds(x)]));
		const cpu0 = cpuSeconds(pid);
		const wal0 = pg ? await pg.wal() : 0;
		const bench0 = process.cpuUsage();
		let rssPeak = rssMB(pid);
		const sampler = setInterval(() => (rssPeak = Math.max(rssPeak, rssMB(pid))), 250);
		measuring = true;
		const t0 = now();
		await sleep(SECONDS * 1000);
		measuring = false;
		const wall = (now() - t0) / 1000;
		clearInterval(sampler);
		const serverCpu = (100 * (cpuSeconds(pid) - cpu0)) / wall;
		const pgCpu = pg
			? (100 * clusterPids(pg.dataDir).reduce((sum, x) => sum + Math.max(0, cpuSeconds(x) - (pg0.get(x) ?? 0)), 0)) / wall
			: null;
		const walBytes = pg ? (await pg.wal()) - wal0 : 0;
		const b1 = process.cpuUsage(bench0);
		running = false;
		await Promise.all(loops);
		await sleep(500);
		steps.push({
			rate,
			edits,
			deliveries,
			expected: edits * (CLIENTS - 1),
			peer: peer.sort((x, y) => x - y),
			ack: ack.sort((x, y) => x - y),
			serverCpu,
			pgCpu,
			benchCpu: (100 * (b1.user + b1.system)) / 1e6 / wall,
			rssPeak,
			walBytesPerUpdate: pg && edits ? walBytes / edits : null,
			logBytesPerUpdate: pg ? await pg.logBytes() : null
		});
		console.log(`  ${name} at ${rate} edits/s per client done (load average ${load()})`);
	}
	await Promise.all(boards.flat().map((p) => p.destroy()));
	return { connectMs, rssIdle, steps };
}

/** `n` updates of a realistic board: 50 points placed, then moves and notes, one update each. */
function coldUpdates(n: number): Uint8Array[] {
	const doc = new Y.Doc();
	const out: Uint8Array[] = [];
	doc.on('update', (u: Uint8Array) => out.push(u));
	const ids: string[] = [];
	for (let i = 0; i < Math.min(50, n); i++) ids.push(addPoint(doc, { x: i * 10, y: i * 5, label: `P${i + 1}` }));
	for (let i = ids.length; i < n; i++) {
		const id = ids[i % ids.length];
		if (i % 2) movePoint(doc, id, (i * 7) % 1000, (i * 13) % 700);
		else updatePoint(doc, id, { notes: `note ${i}` });
	}
	doc.destroy();
	return out;
}

function startReference(): Promise<{ proc: ChildProcess; port: number }> {
	const proc = spawn('node', ['bench/sync-reference.mjs'], { stdio: ['ignore', 'pipe', 'inherit'] });
	return new Promise((resolve, reject) => {
		let out = '';
		proc.stdout!.on('data', (d) => {
			out += d;
			const m = /listening on (\d+)/.exec(out);
			if (m) resolve({ proc, port: Number(m[1]) });
		});
		proc.once('exit', (code) => reject(new Error(`reference server exited with ${code}`)));
	});
}

async function main() {
	console.log(`machine: ${cpus().length} CPUs, ${(totalmem() / 2 ** 30).toFixed(1)} GB memory, Node ${process.version}`);
	console.log(`load average at the start: ${load()} (the machine may be shared: compare runs made together)`);
	console.log(
		`sync benchmark: ${BOARDS} boards × ${CLIENTS} clients, rates ${RATES.join(', ')} edits/s per client, ${SECONDS} s measured after ${WARMUP} s each`
	);
	const bench = await openBenchDatabase({ dir: '.data/pg-sync', defaultPort: 54369, name: 'spotface_sync', poolSize: 4 });
	const { url, handle: t } = bench;
	const results: Record<string, Awaited<ReturnType<typeof runServer>> & { cold: string; commits?: string }> = {};
	let app: RunningApp | null = null;
	let ref: ChildProcess | null = null;
	try {
		const f = await createBoardFixture(t.db, { boards: BOARDS + 1, extraTechnicians: Math.max(0, CLIENTS - 4) });
		const coldSet = coldUpdates(COLD);

		// ---- the reference ------------------------------------------------------------------
		if (args.only !== 'spotface') {
			const r = await startReference();
			ref = r.proc;
			const base = `ws://127.0.0.1:${r.port}`;
			const res = await runServer(
				'reference',
				r.proc.pid!,
				async (b) => {
					const c = new ReferenceClient(`${base}/${f.boardIds[b]}`);
					await c.whenSynced();
					return { doc: c.doc, destroy: () => c.destroy() };
				},
				null
			);
			// Cold load: a room of COLD updates in memory, then a new client's first sync.
			const loader = new ReferenceClient(`${base}/cold`);
			await loader.whenSynced();
			for (const u of coldSet) Y.applyUpdate(loader.doc, u);
			await sleep(2000);
			const started = now();
			const fresh = new ReferenceClient(`${base}/cold`);
			await fresh.whenSynced();
			await waitFor(() => maps(fresh.doc).points.size === Math.min(50, COLD), 'reference cold board', 60_000);
			const coldMs = now() - started;
			fresh.destroy();
			loader.destroy();
			results.reference = { ...res, cold: `${coldMs.toFixed(0)} ms (a client's first sync of a room in memory)` };
			ref.kill('SIGTERM');
			ref = null;
		}

		// ---- Spotface -------------------------------------------------------------------------
		if (args.only !== 'reference') {
			app = await startApp({
				databaseUrl: url,
				env: { COLLAB_UNLOAD_GRACE_MS: '2000' },
				nodeArgs: args.profile ? ['--cpu-prof', `--cpu-prof-dir=${args.profile}`] : []
			});
			const writers = [f.people.admin, f.people.engineer, f.people.technician, ...f.technicians].slice(0, CLIENTS);
			while (writers.length < CLIENTS) writers.push(writers[writers.length % 3]);
			const cookies = await Promise.all(writers.map((w) => sessionCookie(app!.url, w)));
			const a = app;
			const res = await runServer(
				'spotface',
				app.process.pid!,
				async (b, c) => {
					const p: BoardProvider = openProvider(a.url, f.boardIds[b], cookies[c], {
						doc: new Y.Doc(),
						user: { name: `c${c}`, color: '#336699' }
					});
					await p.whenSynced();
					return { doc: p.doc, onUnacked: (cb) => p.on('unsynced', (n: number) => cb(n)), destroy: () => p.destroy() };
				},
				{
					dataDir: '.data/pg-sync/data',
					wal: async () => Number((await sql<{ b: string }>`select wal_bytes::text as b from pg_stat_wal`.execute(t.db)).rows[0].b),
					logBytes: async () => {
						const r = await sql<{ n: string; avg: string | null }>`
							select count(*)::text as n, avg(length(update))::text as avg from board_update`.execute(t.db);
						return r.rows[0].avg === null ? null : Number(r.rows[0].avg);
					}
				}
			);
			// How the writer grouped the updates: the server prints its counters on SIGUSR2.
			process.kill(app.process.pid!, 'SIGUSR2');
			await sleep(300);
			const statsLine = app
				.output()
				.split('\n')
				.filter((l) => l.includes('[collab] stats'))
				.pop();
			const batches = /batches=(\d+) rows=(\d+) largestBatch=(\d+)/.exec(statsLine ?? '');
			const commits = batches
				? `${batches[1]} commits for ${batches[2]} updates (${(Number(batches[2]) / Math.max(1, Number(batches[1]))).toFixed(1)} per commit, largest ${batches[3]})`
				: 'not reported';
			// Cold load: COLD updates in the log of a board nobody has open, compacted into its
			// snapshot, then a fresh client joins (the process loads the snapshot and syncs it).
			const coldBoard = f.boardIds[BOARDS];
			for (let i = 0; i < coldSet.length; i += 1000) {
				await t.db
					.insertInto('board_update')
					.values(
						coldSet.slice(i, i + 1000).map((u) => ({ board_id: coldBoard, update: Buffer.from(u), user_id: f.people.technician.userId }))
					)
					.execute();
			}
			const compacted = await compact(t.db, coldBoard);
			const started = now();
			const p = openProvider(app.url, coldBoard, cookies[0], { doc: new Y.Doc() });
			await p.whenSynced();
			await waitFor(() => maps(p.doc).points.size === Math.min(50, COLD), 'spotface cold board', 60_000);
			const coldMs = now() - started;
			await p.destroy();
			const serverSaid = /loaded board \S+: \d+ log row\(s\) over the snapshot in ([\d.]+) ms/.exec(
				app
					.output()
					.split('\n')
					.filter((l) => l.includes(coldBoard))
					.join('\n')
			)?.[1];
			results.spotface = {
				...res,
				commits,
				cold: `${coldMs.toFixed(0)} ms from join to synced (snapshot of ${compacted?.merged ?? 0} updates, ${((compacted?.snapshotBytes ?? 0) / 1024).toFixed(0)} KB; the server read and loaded it in ${serverSaid ?? '?'} ms)`
			};
		}

		// ---- report ---------------------------------------------------------------------------
		const f1 = (n: number | null) => (n === null || Number.isNaN(n) ? '—' : n.toFixed(1));
		console.log('');
		console.log(`load average at the end: ${load()}`);
		for (const [name, r] of Object.entries(results)) {
			console.log('');
			console.log(
				`${name}: ${BOARDS * CLIENTS} clients connected in ${(r.connectMs / 1000).toFixed(1)} s; server RSS when idle ${r.rssIdle.toFixed(0)} MB`
			);
			console.log(
				'  edits/s per client | edits | delivered | peer p50  p99 (ms) | ack p50  p99 (ms) | server CPU % | PostgreSQL CPU % | bench CPU % | RSS peak MB | WAL B/update | log row B'
			);
			for (const s of r.steps) {
				console.log(
					`  ${String(s.rate).padStart(18)} | ${String(s.edits).padStart(5)} | ${String(s.deliveries).padStart(9)} | ${f1(pct(s.peer, 50)).padStart(8)} ${f1(pct(s.peer, 99)).padStart(5)}` +
						`        | ${f1(s.ack.length ? pct(s.ack, 50) : null).padStart(7)} ${f1(s.ack.length ? pct(s.ack, 99) : null).padStart(5)}        | ${f1(s.serverCpu).padStart(12)} | ${f1(s.pgCpu).padStart(16)} | ${f1(s.benchCpu).padStart(11)} | ${f1(s.rssPeak).padStart(11)} | ${f1(s.walBytesPerUpdate).padStart(12)} | ${f1(s.logBytesPerUpdate).padStart(9)}`
				);
			}
			const over = r.steps.find((s) => pct(s.peer, 99) > 50);
			console.log(
				`  peer p99 passes 50 ms at: ${over ? `${over.rate} edits/s per client` : `not within the steps (up to ${Math.max(...RATES)} edits/s per client)`}`
			);
			console.log(`  cold load of a compacted ${COLD}-update board: ${r.cold}`);
			if (r.commits) console.log(`  writer, whole run: ${r.commits}`);
		}
		const theirs = results.reference;
		const ours = results.spotface;
		if (theirs && ours) {
			console.log('');
			console.log('goals (Spotface against the reference, same run):');
			ours.steps.forEach((s, i) => {
				const r = theirs.steps[i];
				const ratio = pct(s.peer, 99) / pct(r.peer, 99);
				const cpu = s.serverCpu / r.serverCpu;
				console.log(
					`  ${s.rate} edits/s: peer p99 ${ratio.toFixed(2)}× the reference${s.rate <= 2 ? ` (goal ≤ 1.5×: ${ratio <= 1.5 ? 'MET' : 'NOT MET'})` : ''}; ` +
						`server CPU ${cpu.toFixed(2)}× the reference (goal ≤ 2×, PostgreSQL apart: ${cpu <= 2 ? 'MET' : 'NOT MET'}), PostgreSQL ${f1(s.pgCpu)} % besides`
				);
			});
		}
	} finally {
		ref?.kill('SIGTERM');
		await app?.stop();
		await bench.close();
	}
}

main().then(
	() => process.exit(0),
	(e) => {
		console.error(e);
		process.exit(1);
	}
);
