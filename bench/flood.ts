// Flood benchmark: one technician's connection sends large updates that each stay under the
// message limit (by default 64 KB at 14 a second, 15 MB in 16 s, without waiting for answers)
// to one board, while two people edit another board of the same organisation. Prints the other
// board's edit → other client latency (p50/p99) idle and during the flood, their ratio (goal:
// p99 within 2×), how much of the flood the server took, and the server's memory growth.
//
// Runs on a private PostgreSQL cluster (.data/pg-flood, port SPOTFACE_BENCH_PG_PORT or 54359, a
// fresh database each run, stopped at the end) against the built app with the default limits;
// `--no-limits` lifts the byte budgets and size limits to show what they prevent.
//
//   npm run bench:flood -- [--seconds 16] [--size 65536] [--rate 14] [--edits 5] [--no-limits] [--profile dir]
//
// Hold the build lock, as the integration tests do (it uses build/):
//   flock /tmp/build.lock npx tsx bench/flood.ts
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { randomBytes } from 'node:crypto';
import { cpus, loadavg } from 'node:os';
import * as Y from 'yjs';
import * as encoding from 'lib0/encoding';
import * as syncProtocol from 'y-protocols/sync';
import { io as connect, type Socket } from 'socket.io-client';
import { openBenchDatabase } from './private-db';
import { startApp, type RunningApp } from '../tests/helpers/app';
import { createBoardFixture, openProvider, sessionCookie, waitFor } from '../tests/helpers/collab';
import { addPoint, maps, updatePoint, LOCAL_ORIGIN } from '../src/lib/board/model';
import { EVENT_JOIN, EVENT_MESSAGE, MESSAGE_SYNC, type JoinReply, type MessageAck } from '../src/lib/board/sync/protocol';
import type { BoardProvider } from '../src/lib/board/sync/provider';

const { values: args } = parseArgs({
	options: {
		seconds: { type: 'string', default: '16' },
		size: { type: 'string', default: String(64 * 1024) },
		rate: { type: 'string', default: '14' },
		edits: { type: 'string', default: '5' },
		'no-limits': { type: 'boolean', default: false },
		// Writes a CPU profile of the server to this folder (node --cpu-prof).
		profile: { type: 'string' }
	}
});
const SECONDS = Number(args.seconds);
const SIZE = Number(args.size);
const RATE = Number(args.rate);
const EDITS = Number(args.edits);
const LIMITS = !args['no-limits'];
if (![SECONDS, SIZE, RATE, EDITS].every((n) => Number.isFinite(n) && n > 0)) {
	console.error('usage: npm run bench:flood -- [--seconds N] [--size bytes] [--rate updates/s] [--edits edits/s per client] [--no-limits]');
	process.exit(2);
}

const now = () => performance.now();
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const rssMB = (pid: number) => Number(/VmRSS:\s+(\d+) kB/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1] ?? NaN) / 1024;
const pct = (sorted: number[], p: number) =>
	sorted.length ? sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] : NaN;

function floodMessage(bytes: number): Uint8Array {
	// Valid board content (points with long notes), so the flood costs the server a full check.
	const doc = new Y.Doc();
	doc.transact(() => {
		for (let left = bytes, i = 0; left > 0; left -= 2000, i++) {
			addPoint(doc, { x: i, y: i, label: `F${i + 1}`, notes: randomBytes(1000).toString('hex').slice(0, Math.min(2000, left)) });
		}
	});
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, MESSAGE_SYNC);
	syncProtocol.writeUpdate(e, Y.encodeStateAsUpdate(doc));
	return encoding.toUint8Array(e);
}

async function main() {
	console.log(
		`machine load average at the start: ${loadavg()
			.map((x) => x.toFixed(2))
			.join(' ')} (${cpus().length} CPUs)`
	);
	console.log(
		`flood benchmark: ${SIZE / 1024} KB updates at ${RATE}/s for ${SECONDS} s (${((SIZE * RATE * SECONDS) / 2 ** 20).toFixed(1)} MB) on one board; ` +
			`2 people on another board at ${EDITS} edits/s each; ${LIMITS ? 'default limits' : 'NO byte budgets or size limits'}`
	);
	const bench = await openBenchDatabase({ dir: '.data/pg-flood', defaultPort: 54359, name: 'spotface_flood', poolSize: 3 });
	const { url, handle: t } = bench;
	const unlimited = {
		COLLAB_MAX_UPDATE_BYTES: '1000000',
		COLLAB_MAX_DOCUMENT_BYTES: String(2 ** 40),
		COLLAB_SOCKET_BYTES_PER_SECOND: String(2 ** 40),
		COLLAB_SOCKET_BYTE_BURST: String(2 ** 40),
		COLLAB_BOARD_BYTES_PER_SECOND: String(2 ** 40),
		COLLAB_BOARD_BYTE_BURST: String(2 ** 40)
	};
	let app: RunningApp | null = null;
	const providers: BoardProvider[] = [];
	let flooder: Socket | null = null;
	try {
		app = await startApp({
			databaseUrl: url,
			env: LIMITS ? {} : unlimited,
			nodeArgs: args.profile ? ['--cpu-prof', `--cpu-prof-dir=${args.profile}`] : []
		});
		const pid = app.process.pid!;
		const f = await createBoardFixture(t.db, { boards: 2 });
		const [floodBoard, quietBoard] = f.boardIds;
		const techCookie = await sessionCookie(app.url, f.people.technician);
		const engCookie = await sessionCookie(app.url, f.people.engineer);

		// ---- the quiet board: two people, each timing the other's edits ----------------------
		const a = openProvider(app.url, quietBoard, engCookie);
		const b = openProvider(app.url, quietBoard, techCookie);
		providers.push(a, b);
		await Promise.all([a.whenSynced(), b.whenSynced()]);
		const own = [addPoint(a.doc, { x: 10, y: 10, label: 'A' }), addPoint(b.doc, { x: 20, y: 20, label: 'B' })];
		await waitFor(() => maps(a.doc).points.size === 2 && maps(b.doc).points.size === 2, 'both points on both');
		const sentAt = new Map<string, number>();
		let phase: 'idle' | 'flood' | null = null;
		const samples: Record<'idle' | 'flood', number[]> = { idle: [], flood: [] };
		const phaseOf = new Map<string, 'idle' | 'flood'>();
		for (const p of [a, b]) {
			maps(p.doc).points.observeDeep((events, txn) => {
				if (txn.local) return;
				const t1 = now();
				for (const e of events) {
					const target = e.target as Y.Map<unknown>;
					if (!(target instanceof Y.Map) || !e.keys?.has('notes')) continue;
					const key = target.get('notes') as string;
					const t0 = sentAt.get(key);
					const ph = phaseOf.get(key);
					if (t0 !== undefined && ph) samples[ph].push(t1 - t0);
				}
			});
		}
		let editing = true;
		let seq = 0;
		const editors = [a, b].map(async (p, i) => {
			await sleep(Math.random() * 200);
			while (editing) {
				const key = `e:${i}:${seq++}`;
				sentAt.set(key, now());
				if (phase) phaseOf.set(key, phase);
				p.doc.transact(() => updatePoint(p.doc, own[i], { notes: key }), LOCAL_ORIGIN);
				await sleep((-Math.log(1 - Math.random()) * 1000) / EDITS);
			}
		});

		let peak = rssMB(pid);
		const sampler = setInterval(() => (peak = Math.max(peak, rssMB(pid))), 100);

		// ---- idle ----------------------------------------------------------------------------
		await sleep(2000);
		const rssBefore = rssMB(pid);
		phase = 'idle';
		await sleep(SECONDS * 1000);

		// ---- flood ---------------------------------------------------------------------------
		flooder = connect(app.url, { transports: ['websocket'], extraHeaders: { cookie: techCookie }, forceNew: true, reconnection: false });
		await new Promise<void>((resolve, reject) => {
			flooder!.once('connect', () => resolve());
			flooder!.once('connect_error', reject);
		});
		const join = (await flooder.emitWithAck(EVENT_JOIN, { boardId: floodBoard })) as JoinReply;
		if (!join.ok) throw new Error(join.error);
		// Prepared in advance so making them does not slow the benchmark's own clients.
		const messages = Array.from({ length: Math.ceil(RATE * SECONDS) }, () => floodMessage(SIZE));
		const acks: MessageAck[] = [];
		let closedBy: string | null = null;
		flooder.on('board:closed', (e: { reason: string }) => (closedBy = e.reason));
		phase = 'flood';
		const floodStart = now();
		for (let i = 0; i < messages.length && flooder.connected; i++) {
			flooder.emit(EVENT_MESSAGE, messages[i], (ack: MessageAck) => acks.push(ack));
			const due = floodStart + ((i + 1) * 1000) / RATE;
			await sleep(Math.max(0, due - now()));
		}
		const floodSeconds = (now() - floodStart) / 1000;
		phase = null;
		await waitFor(() => acks.length >= messages.length || !flooder!.connected, 'answers to the flood', 60_000).catch(() => {});
		editing = false;
		await Promise.all(editors);
		clearInterval(sampler);
		await waitFor(() => a.unsynced === 0 && b.unsynced === 0, 'the quiet board all stored', 30_000);
		const rssAfter = rssMB(pid);
		const stored = await t.db
			.selectFrom('board_update')
			.select((eb) => [eb.fn.countAll<string>().as('n'), eb.fn.sum<string>(eb.fn('length', ['update'])).as('bytes')])
			.where('board_id', '=', floodBoard)
			.executeTakeFirstOrThrow();
		const snapshot = await t.db
			.selectFrom('board')
			.select((eb) => eb.fn.coalesce(eb.fn<number>('length', ['snapshot']), eb.lit(0)).as('bytes'))
			.where('id', '=', floodBoard)
			.executeTakeFirstOrThrow();

		// ---- report --------------------------------------------------------------------------
		const idle = samples.idle.sort((x, y) => x - y);
		const flood = samples.flood.sort((x, y) => x - y);
		const f2 = (n: number) => n.toFixed(1).padStart(7);
		const ok = acks.filter((x) => x.ok).length;
		const slowed = acks.filter((x) => 'retry' in x).length;
		const refused = acks.filter((x) => 'refused' in x).length;
		console.log('');
		console.log(
			`flood: ${messages.length} updates sent in ${floodSeconds.toFixed(1)} s; accepted ${ok}, slowed ("not now") ${slowed}, refused ${refused}` +
				(closedBy ? `; socket closed: ${closedBy}` : '')
		);
		console.log(
			`flood board stored: snapshot ${(Number(snapshot.bytes) / 2 ** 20).toFixed(2)} MB + ${stored.n} log rows ${(Number(stored.bytes ?? 0) / 2 ** 20).toFixed(2)} MB`
		);
		console.log(`other board, edit → other person (ms):   samples     p50     p99     max`);
		console.log(
			`   idle                              ${String(idle.length).padStart(10)} ${f2(pct(idle, 50))} ${f2(pct(idle, 99))} ${f2(idle.at(-1) ?? NaN)}`
		);
		console.log(
			`   during the flood                  ${String(flood.length).padStart(10)} ${f2(pct(flood, 50))} ${f2(pct(flood, 99))} ${f2(flood.at(-1) ?? NaN)}`
		);
		const ratio = pct(flood, 99) / pct(idle, 99);
		console.log(`p99 during / idle: ${ratio.toFixed(2)}× (goal ≤ 2×) ${ratio <= 2 ? 'MET' : 'NOT MET'}`);
		console.log(
			`server RSS (MB): before the flood ${rssBefore.toFixed(1)}, peak ${peak.toFixed(1)}, after ${rssAfter.toFixed(1)}; growth to peak ${(peak - rssBefore).toFixed(1)}`
		);
		console.log(
			`machine load average at the end: ${loadavg()
				.map((x) => x.toFixed(2))
				.join(' ')}`
		);
	} finally {
		flooder?.disconnect();
		await Promise.all(providers.map((p) => p.destroy()));
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
