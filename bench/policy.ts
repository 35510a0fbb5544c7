// Board policy benchmark: how long checkBoardChange and applyLocalChecked take for one small edit
// on boards from the demo's size up to the default limits (2,000 points, 1,000 routes, 500
// zones), with a fresh copy of the document per check and with a shadow kept in step (as the
// server can), and with or without the document's size passed in. Prints median and p95, ms.
//
//   npx tsx bench/policy.ts [--runs 200]
import { parseArgs } from 'node:util';
import * as Y from 'yjs';
import {
	addPoint,
	addRoute,
	addZone,
	applyLocalChecked,
	checkBoardChange,
	cloneDoc,
	readBoard,
	setScale,
	updatePoint,
	type BoardActor
} from '../src/lib/board/model';

const { values } = parseArgs({ options: { runs: { type: 'string', default: '200' } } });
const runs = Number(values.runs);
const tam: BoardActor = { role: 'technician', userId: 'u-tam', name: 'Tam' };

function board(points: number, routes: number, zones: number) {
	const doc = new Y.Doc();
	setScale(doc, { a: [0, 0], b: [100, 0], lengthMm: 250 });
	const ids: string[] = [];
	for (let i = 0; i < points; i++) {
		ids.push(
			addPoint(doc, { x: i % 1000, y: i, surface: 'cast_housing', mounting: 'stud', flatDiameterMm: 30, notes: 'Seat spot-faced on site.' })
		);
	}
	for (let i = 0; i < routes; i++)
		addRoute(doc, {
			pointId: ids[i % ids.length],
			vertices: [
				[i, 0],
				[i, 50],
				[i + 40, 90]
			],
			crossSectionMm2: 0.75
		});
	for (let i = 0; i < zones; i++)
		addZone(doc, {
			polygon: [
				[i, 0],
				[i + 5, 0],
				[i + 5, 5]
			],
			kind: 'shaft'
		});
	return { doc, ids };
}

function stats(ms: number[]) {
	const s = [...ms].sort((a, b) => a - b);
	const at = (q: number) => s[Math.min(s.length - 1, Math.floor(q * s.length))].toFixed(3);
	return `median ${at(0.5)} ms  p95 ${at(0.95)} ms`;
}

for (const [p, r, z] of [
	[3, 2, 1],
	[200, 100, 50],
	[2000, 1000, 500]
] as const) {
	const { doc, ids } = board(p, r, z);
	const size = Y.encodeStateAsUpdate(doc).byteLength;
	console.log(`\nboard: ${p} points, ${r} routes, ${z} zones, ${(size / 1024).toFixed(0)} KB`);
	const edits: Uint8Array[] = [];
	const client = cloneDoc(doc);
	client.on('update', (u: Uint8Array) => edits.push(u));
	for (let i = 0; i < runs; i++) updatePoint(client, ids[i % ids.length], { notes: `edit ${i}` });

	const copy: number[] = [];
	const plain = cloneDoc(doc);
	for (const u of edits) {
		const t = performance.now();
		const res = checkBoardChange(plain, u, tam, { frozen: false });
		copy.push(performance.now() - t);
		if (!res.ok) throw new Error(JSON.stringify(res));
		Y.applyUpdate(plain, u);
	}
	console.log(`  checkBoardChange, fresh copy each time:        ${stats(copy)}`);

	const server = cloneDoc(doc);
	const shadow = cloneDoc(doc);
	let bytes = size;
	const withShadow: number[] = [];
	for (const u of edits) {
		const t = performance.now();
		const res = checkBoardChange(server, u, tam, { frozen: false, documentBytes: bytes }, { shadow });
		withShadow.push(performance.now() - t);
		if (!res.ok) throw new Error(JSON.stringify(res));
		Y.applyUpdate(server, u);
		bytes += u.byteLength;
	}
	console.log(`  checkBoardChange, shadow + documentBytes:      ${stats(withShadow)}`);

	const local: number[] = [];
	const browser = cloneDoc(doc);
	for (let i = 0; i < runs; i++) {
		const t = performance.now();
		const res = applyLocalChecked(browser, tam, { frozen: false }, (d) => updatePoint(d, ids[i % ids.length], { notes: `local ${i}` }));
		local.push(performance.now() - t);
		if (!res.ok) throw new Error(JSON.stringify(res));
	}
	console.log(`  applyLocalChecked (shadow made on first use):  ${stats(local)}`);
	if (readBoard(browser).points.length !== p) throw new Error('points lost');
}
