// Live board benchmark: 20 boards × 6 clients, each client making 0.5 edits/s (exponential
// gaps), all through the one sync client (BoardProvider) against the built app on a fresh test
// database. Prints the latency from an edit to its arrival at each other client of the board
// (p50/p95/p99/max), how many of the edits received were already committed (peers may see an
// edit before its commit; the writer's acknowledgement waits for it), and the
// server's memory before, during and after.
//
// It runs on a private PostgreSQL cluster of its own (.data/pg-bench, port 54349, a fresh
// database each run, stopped at the end), so other work on the shared test cluster (databases
// being cloned and dropped) does not show up as board latency.
//
//   npx tsx bench/collab.ts [--seconds 60] [--boards 20] [--clients 6] [--rate 0.5] [--processes 1|2] [--commit sync|async]
//
// Run it with the build lock held, as the integration tests are (it uses build/):
//   flock /tmp/build.lock npx tsx bench/collab.ts
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { cpus, loadavg } from 'node:os';
import pg from 'pg';
import * as Y from 'yjs';
import { openBenchDatabase } from './private-db';
import { startApp, type RunningApp } from '../tests/helpers/app';
import { createBoardFixture, openProvider, sessionCookie, waitFor } from '../tests/helpers/collab';
import { addPoint, maps, movePoint, updatePoint, LOCAL_ORIGIN } from '../src/lib/board/model';
import type { BoardProvider } from '../src/lib/board/sync/provider';

const { values: args } = parseArgs({
	options: {
		seconds: { type: 'string', default: '60' },
		warmup: { type: 'string', default: '5' },
		boards: { type: 'string', default: '20' },
		clients: { type: 'string', default: '6' },
		rate: { type: 'string', default: '0.5' },
		processes: { type: 'string', default: '1' },
		grace: { type: 'string', default: '3000' },
		// 'async' only to see how much of the tail is the disk: updates are then committed but
		// not yet flushed when acknowledged. The product runs with synchronous commit.
		commit: { type: 'string', default: 'sync' }
	}
});
const SECONDS = Number(args.seconds);
const WARMUP = Number(args.warmup);
const BOARDS = Number(args.boards);
const CLIENTS = Number(args.clients);
const RATE = Number(args.rate);
const PROCESSES = Number(args.processes);
const GRACE_MS = Number(args.grace);
const COMMIT = args.commit === 'async' ? 'async' : 'sync';
if (
	![SECONDS, WARMUP, BOARDS, CLIENTS, RATE, PROCESSES, GRACE_MS].every((n) => Number.isFinite(n) && n >= 0) ||
	CLIENTS < 2 ||
	PROCESSES < 1 ||
	PROCESSES > 2
) {
	console.error(
		'usage: npx tsx bench/collab.ts [--seconds N] [--warmup N] [--boards N] [--clients N≥2] [--rate edits/s] [--processes 1|2] [--grace ms] [--commit sync|async]'
	);
	process.exit(2);
}

const now = () => performance.now();
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

function rssMB(pid: number): number {
	const m = /VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
	return m ? Number(m[1]) / 1024 : NaN;
}

/** Asks the server for its own figures (SIGUSR2 → one '[collab] stats' line). */
async function serverStats(app: RunningApp) {
	const before = app.output().length;
	app.process.kill('SIGUSR2');
	const line = (await waitFor(() => /\[collab\] stats [^\n]*\n/.exec(app.output().slice(before))?.[0], 'server stats', 5000))!;
	return Object.fromEntries([...line.matchAll(/(\w+)=([\d.]+)/g)].map((m) => [m[1], Number(m[2])]));
}

/** CPU seconds (user + system) a process has used so far. */
function cpuSeconds(pid: number): number {
	const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
	return (Number(fields[11]) + Number(fields[12])) / 100; // utime, stime in clock ticks (100/s)
}

function percentile(sorted: number[], p: number) {
	if (sorted.length === 0) return NaN;
	return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
}

async function main() {
	const started = now();
	console.log(
		`machine load average at the start: ${loadavg()
			.map((x) => x.toFixed(2))
			.join(' ')} (${cpus().length} CPUs)`
	);
	console.log(
		`live board benchmark: ${BOARDS} boards × ${CLIENTS} clients, ${RATE} edits/s each, ${SECONDS} s measured after ${WARMUP} s warm-up, ${PROCESSES} server process(es), ${COMMIT === 'sync' ? 'synchronous commit (as in production)' : 'ASYNCHRONOUS commit (comparison only)'}`
	);
	const bench = await openBenchDatabase({
		dir: '.data/pg-bench',
		defaultPort: 54349,
		name: 'spotface_bench',
		prepare: (c) => {
			c.psql('alter system reset all');
			c.psql('select pg_reload_conf()');
		}
	});
	if (COMMIT === 'async') bench.cluster.psql('alter database spotface_bench set synchronous_commit = off');
	const { url, handle: t } = bench;
	const apps: RunningApp[] = [];
	const providers: BoardProvider[] = [];
	const probe = new pg.Pool({ connectionString: url, max: 4 });
	try {
		for (let i = 0; i < PROCESSES; i++) {
			// --expose-gc: the server's stats signal then measures memory after a full collection.
			const nodeOptions = `${process.env.NODE_OPTIONS ?? ''} --expose-gc`.trim();
			apps.push(await startApp({ databaseUrl: url, env: { COLLAB_UNLOAD_GRACE_MS: String(GRACE_MS), NODE_OPTIONS: nodeOptions } }));
		}
		const f = await createBoardFixture(t.db, { boards: BOARDS, extraTechnicians: Math.max(0, CLIENTS - 4) });
		const writers = [f.people.admin, f.people.engineer, f.people.technician, ...f.technicians].slice(0, CLIENTS);
		while (writers.length < CLIENTS) writers.push(writers[writers.length % 3]);
		const cookies = await Promise.all(writers.map((w, i) => sessionCookie(apps[i % PROCESSES].url, w)));
		await sleep(1000);
		const statsBefore = await Promise.all(apps.map(serverStats));
		const rssBefore = apps.map((a) => rssMB(a.process.pid!));
		const benchLoop = monitorEventLoopDelay({ resolution: 1 });

		// ---- connect everyone --------------------------------------------------------------
		const sentAt = new Map<string, number>();
		const measuredKeys = new Set<string>();
		const latencies: number[] = [];
		let measuring = false;
		let received = 0;
		let probes = 0;
		let probesStored = 0;
		const probeWork: Promise<void>[] = [];
		const connectStart = now();
		const boards: Array<{ id: string; clients: BoardProvider[]; ownPoint: string[] }> = [];
		for (let b = 0; b < BOARDS; b++) {
			const boardId = f.boardIds[b];
			const clients: BoardProvider[] = [];
			for (let c = 0; c < CLIENTS; c++) {
				const app = apps[c % PROCESSES];
				const p = openProvider(app.url, boardId, cookies[c], { doc: new Y.Doc(), user: { name: `c${c}`, color: '#336699' } });
				providers.push(p);
				clients.push(p);
			}
			boards.push({ id: boardId, clients, ownPoint: [] });
		}
		await Promise.all(providers.map((p) => p.whenSynced()));
		const connectMs = now() - connectStart;

		for (const board of boards) {
			board.clients.forEach((p, c) => board.ownPoint.push(addPoint(p.doc, { x: 10 + c, y: 10 + c, label: `C${c}` })));
			await waitFor(() => board.clients.every((p) => maps(p.doc).points.size === CLIENTS), 'every point on every client', 20_000);
			// Each client times the edits it did not make; one per board also checks storage.
			board.clients.forEach((p, c) => {
				maps(p.doc).points.observeDeep((events, txn) => {
					if (txn.local) return;
					const t1 = now();
					for (const e of events) {
						const target = e.target as Y.Map<unknown>;
						if (!(target instanceof Y.Map) || !e.keys?.has('notes')) continue;
						const key = target.get('notes');
						if (typeof key !== 'string' || !key.startsWith('bench:')) continue;
						const t0 = sentAt.get(key);
						if (t0 === undefined || !measuredKeys.has(key)) continue;
						latencies.push(t1 - t0);
						received++;
						if (c === (Number(key.split(':')[2]) + 1) % CLIENTS) {
							probes++;
							probeWork.push(
								probe
									.query(
										`select exists(select 1 from board_update where board_id = $1 and position($2::bytea in update) > 0)
										     or exists(select 1 from board where id = $1 and position($2::bytea in snapshot) > 0) as stored`,
										[board.id, Buffer.from(key)]
									)
									.then((r) => {
										if (r.rows[0].stored) probesStored++;
									})
							);
						}
					}
				});
			});
		}

		// ---- edits -------------------------------------------------------------------------
		let sent = 0;
		let seq = 0;
		let running = true;
		const peakRss = apps.map(() => 0);
		const sampler = setInterval(() => apps.forEach((a, i) => (peakRss[i] = Math.max(peakRss[i], rssMB(a.process.pid!)))), 250);
		const loops = boards.flatMap((board, b) =>
			board.clients.map(async (p, c) => {
				await sleep(Math.random() * (1000 / RATE));
				while (running) {
					const key = `bench:${b}:${c}:${seq++}`;
					const pointId = board.ownPoint[c];
					sentAt.set(key, now());
					if (measuring) {
						sent++;
						measuredKeys.add(key);
					}
					p.doc.transact(() => {
						movePoint(p.doc, pointId, 10 + Math.random() * 1000, 10 + Math.random() * 700);
						updatePoint(p.doc, pointId, { notes: key });
					}, LOCAL_ORIGIN);
					// Exponential gaps: edits arrive as a Poisson stream of RATE per second.
					await sleep((-Math.log(1 - Math.random()) * 1000) / RATE);
				}
			})
		);
		await sleep(WARMUP * 1000);
		benchLoop.enable();
		measuring = true;
		const measureStart = now();
		const serverCpuStart = apps.map((a) => cpuSeconds(a.process.pid!));
		const benchCpuStart = process.cpuUsage();
		await sleep(SECONDS * 1000);
		measuring = false;
		benchLoop.disable();
		const measuredSeconds = (now() - measureStart) / 1000;
		const serverCpu = apps.map((a, i) => (100 * (cpuSeconds(a.process.pid!) - serverCpuStart[i])) / measuredSeconds);
		const benchCpuUsed = process.cpuUsage(benchCpuStart);
		const benchCpu = (100 * (benchCpuUsed.user + benchCpuUsed.system)) / 1e6 / measuredSeconds;
		running = false;
		await Promise.all(loops);
		clearInterval(sampler);
		const statsDuring = await Promise.all(apps.map(serverStats));
		await waitFor(() => providers.every((p) => p.unsynced === 0), 'every edit acknowledged', 30_000);
		await Promise.all(probeWork);

		// Every board converged, and every edit is in storage.
		let converged = 0;
		for (const board of boards) {
			const json = board.clients.map((p) => JSON.stringify(Y.encodeStateVector(p.doc)));
			if (json.every((j) => j === json[0])) converged++;
		}
		const storedRows = Number((await probe.query(`select (select count(*) from board_update) + 0 as n`)).rows[0].n);

		// ---- everyone leaves -----------------------------------------------------------------
		await Promise.all(providers.map((p) => p.destroy()));
		providers.length = 0;
		const leftAt = now();
		await waitFor(
			() => apps.every((a) => (a.output().match(/\[collab\] unloaded board/g) ?? []).length >= BOARDS / PROCESSES - 0.5) || null,
			'boards unloaded',
			GRACE_MS + 30_000
		);
		const unloadedAfter = (now() - leftAt) / 1000;
		await sleep(5000);
		const statsAfter = await Promise.all(apps.map(serverStats));
		const rssAfter = apps.map((a) => rssMB(a.process.pid!));

		// ---- report ----------------------------------------------------------------------
		latencies.sort((a, b) => a - b);
		const expected = sent * (CLIENTS - 1);
		const fmt = (n: number) => n.toFixed(2).padStart(8);
		console.log('');
		console.log(`connected ${BOARDS * CLIENTS} clients in ${(connectMs / 1000).toFixed(1)} s`);
		console.log(`edits sent while measuring: ${sent} (${(sent / measuredSeconds).toFixed(1)}/s over ${measuredSeconds.toFixed(1)} s)`);
		console.log(`deliveries timed: ${received} of ${expected} expected (${CLIENTS - 1} other clients per edit)`);
		console.log(`edit → other client latency (ms):`);
		console.log(`   p50 ${fmt(percentile(latencies, 50))}`);
		console.log(`   p90 ${fmt(percentile(latencies, 90))}`);
		console.log(`   p95 ${fmt(percentile(latencies, 95))}`);
		console.log(`   p99 ${fmt(percentile(latencies, 99))}   (target ≤ 10 ms)`);
		console.log(`   max ${fmt(latencies[latencies.length - 1] ?? NaN)}`);
		console.log(`   over 10 ms: ${((100 * latencies.filter((x) => x > 10).length) / Math.max(1, latencies.length)).toFixed(2)} %`);
		console.log(
			`committed on arrival: ${probesStored} of ${probes} received edits were found in PostgreSQL by a query sent on arrival` +
				` (peers see an update once it has passed the checks, before its commit; the writer is acknowledged after it)`
		);
		console.log(`boards converged: ${converged} of ${BOARDS}; log rows at the end: ${storedRows}`);
		apps.forEach((a, i) => {
			const b = statsBefore[i];
			const d = statsDuring[i];
			const af = statsAfter[i];
			console.log(
				`server ${i + 1} memory (MB): RSS before ${rssBefore[i].toFixed(1)}, during (peak) ${peakRss[i].toFixed(1)}, after ${rssAfter[i].toFixed(1)}` +
					` | heap used before ${b.heapUsedMB}, during ${d.heapUsedMB}, after ${af.heapUsedMB}` +
					` | open boards during ${d.rooms}, after ${af.rooms}`
			);
			console.log(`server ${i + 1} CPU while measuring: ${serverCpu[i].toFixed(1)} % of one core`);
			console.log(
				`server ${i + 1} storage: ${d.rows} updates in ${d.batches} INSERTs (largest batch ${d.largestBatch}); append+commit p50 ${d.storeP50Ms} ms, p99 ${d.storeP99Ms} ms; event-loop delay p99 ${d.loopDelayP99Ms} ms, max ${d.loopDelayMaxMs} ms`
			);
		});
		console.log(`benchmark process (all ${BOARDS * CLIENTS} clients) CPU while measuring: ${benchCpu.toFixed(1)} % of one core`);
		console.log(
			`benchmark process event-loop delay: p99 ${(benchLoop.percentile(99) / 1e6 - 1).toFixed(2)} ms, max ${(benchLoop.max / 1e6 - 1).toFixed(2)} ms`
		);
		console.log(
			`machine load average at the end: ${loadavg()
				.map((x) => x.toFixed(2))
				.join(' ')} (${cpus().length} CPUs)`
		);
		console.log(`boards unloaded ${unloadedAfter.toFixed(1)} s after the last client left (grace ${GRACE_MS / 1000} s)`);
		console.log(`total run ${((now() - started) / 1000).toFixed(0)} s`);
	} finally {
		await Promise.all(providers.map((p) => p.destroy()));
		await probe.end();
		await Promise.all(apps.map((a) => a.stop()));
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
