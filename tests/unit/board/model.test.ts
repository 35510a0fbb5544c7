import { describe, expect, test } from 'vitest';
import * as Y from 'yjs';
import {
	addPoint,
	addRoute,
	addZone,
	clearScale,
	createUndoManager,
	deleteItems,
	deletePoint,
	LOCAL_ORIGIN,
	maps,
	movePoint,
	nextPointLabel,
	readBoard,
	readPoint,
	setRouteVertices,
	setScale,
	setZonePolygon,
	updatePoint,
	updateRoute,
	updateZone
} from '../../../src/lib/board/model';

/** Two replicas that exchange every update, as the server relays them. */
function pair() {
	const a = new Y.Doc();
	const b = new Y.Doc();
	a.on('update', (u: Uint8Array, origin: unknown) => origin !== 'remote' && Y.applyUpdate(b, u, 'remote'));
	b.on('update', (u: Uint8Array, origin: unknown) => origin !== 'remote' && Y.applyUpdate(a, u, 'remote'));
	return { a, b };
}

describe('points', () => {
	test('a new point gets the next free label, the defaults and its position', () => {
		const doc = new Y.Doc();
		const id = addPoint(doc, { x: 120, y: 80, createdBy: 'Tam' });
		const [p] = readBoard(doc).points;
		expect(p).toMatchObject({ id, x: 120, y: 80, label: 'P1', status: 'proposed', surface: null, mounting: null, createdBy: 'Tam' });
		updatePoint(doc, id, { label: 'P7' });
		addPoint(doc, { x: 1, y: 1 });
		expect(readBoard(doc).points.map((q) => q.label)).toEqual(['P7', 'P8']);
		expect(nextPointLabel(doc)).toBe('P9');
	});

	test('fields are validated on the way in and nothing is stored when one is wrong', () => {
		const doc = new Y.Doc();
		const id = addPoint(doc, { x: 0, y: 0 });
		expect(() => updatePoint(doc, id, { flatDiameterMm: -3 })).toThrow(/Flat seat diameter must be 0 to 1000 mm/);
		expect(() => updatePoint(doc, id, { surface: 'plywood' as never })).toThrow(/Surface: choose one/);
		expect(() => updatePoint(doc, id, { colour: 'red' } as never)).toThrow();
		expect(() => addPoint(doc, { x: Number.NaN, y: 0 })).toThrow(/Position must be a number/);
		expect(readBoard(doc).points[0].flatDiameterMm).toBeNull();
		expect(updatePoint(doc, 'no-such-id', { notes: 'x' })).toBe(false);
	});

	test('moving a point moves the first corner of its routes; deleting it deletes them', () => {
		const doc = new Y.Doc();
		const p = addPoint(doc, { x: 10, y: 10 });
		const r = addRoute(doc, {
			pointId: p,
			vertices: [
				[10, 10],
				[50, 10],
				[50, 90]
			]
		});
		movePoint(doc, p, 20, 30);
		expect(readBoard(doc).routes[0].vertices).toEqual([
			[20, 30],
			[50, 10],
			[50, 90]
		]);
		deletePoint(doc, p);
		const b = readBoard(doc);
		expect(b.points).toEqual([]);
		expect(b.routes).toEqual([]);
		expect(maps(doc).routes.has(r)).toBe(false);
	});

	test('a value written by an older or hostile peer is read back as its default', () => {
		const doc = new Y.Doc();
		const id = addPoint(doc, { x: 5, y: 5 });
		doc.transact(() => {
			const m = maps(doc).points.get(id)!;
			m.set('wallThicknessMm', 'thick');
			m.set('status', 'done');
		}, 'remote');
		const [p] = readBoard(doc).points;
		expect(p.wallThicknessMm).toBeNull();
		expect(p.status).toBe('proposed');
	});
});

describe('routes, zones and scale', () => {
	test('a route must start at a point on the board and have two corners', () => {
		const doc = new Y.Doc();
		expect(() =>
			addRoute(doc, {
				pointId: 'nope',
				vertices: [
					[0, 0],
					[1, 1]
				]
			})
		).toThrow(/start at a measurement point/);
		const p = addPoint(doc, { x: 0, y: 0 });
		expect(() => addRoute(doc, { pointId: p, vertices: [[0, 0]] })).toThrow(/at least two points/);
		const r = addRoute(doc, {
			pointId: p,
			vertices: [
				[0, 0],
				[3, 4]
			],
			crossSectionMm2: 0.75
		});
		expect(() => updateRoute(doc, r, { crossSectionMm2: 0.8 })).toThrow(/choose 0.5, 0.75, 1, 1.5, 2.5 mm²/);
		updateRoute(doc, r, { lengthEnteredM: 12.5, fixings: 'clips' });
		setRouteVertices(doc, r, [
			[0, 0],
			[6, 8],
			[9, 9]
		]);
		expect(readBoard(doc).routes[0]).toMatchObject({
			crossSectionMm2: 0.75,
			lengthEnteredM: 12.5,
			fixings: 'clips',
			vertices: [
				[0, 0],
				[6, 8],
				[9, 9]
			]
		});
	});

	test('zones need three corners; scale needs two distinct ends and a positive length', () => {
		const doc = new Y.Doc();
		expect(() =>
			addZone(doc, {
				polygon: [
					[0, 0],
					[1, 1]
				]
			})
		).toThrow(/three corners/);
		const z = addZone(doc, {
			polygon: [
				[0, 0],
				[10, 0],
				[10, 10]
			],
			kind: 'coupling'
		});
		updateZone(doc, z, { label: 'Coupling guard' });
		setZonePolygon(doc, z, [
			[0, 0],
			[20, 0],
			[20, 20],
			[0, 20]
		]);
		expect(readBoard(doc).zones[0]).toMatchObject({
			kind: 'coupling',
			label: 'Coupling guard',
			polygon: [
				[0, 0],
				[20, 0],
				[20, 20],
				[0, 20]
			]
		});
		expect(() => setScale(doc, { a: [0, 0], b: [0, 0], lengthMm: 100 })).toThrow(/two distinct ends/);
		expect(() => setScale(doc, { a: [0, 0], b: [10, 0], lengthMm: 0 })).toThrow(/above 0/);
		setScale(doc, { a: [0, 0], b: [200, 0], lengthMm: 500 });
		expect(readBoard(doc).scale).toEqual({ a: [0, 0], b: [200, 0], lengthMm: 500 });
		clearScale(doc);
		expect(readBoard(doc).scale).toBeNull();
	});

	test('deleting a mixed selection is one step', () => {
		const doc = new Y.Doc();
		const undo = createUndoManager(doc);
		const p = addPoint(doc, { x: 0, y: 0 });
		const z = addZone(doc, {
			polygon: [
				[0, 0],
				[10, 0],
				[10, 10]
			]
		});
		undo.stopCapturing();
		expect(deleteItems(doc, [p, z, 'unknown'])).toBe(2);
		expect(readBoard(doc).points.length + readBoard(doc).zones.length).toBe(0);
		undo.undo();
		expect(readBoard(doc).points).toHaveLength(1);
		expect(readBoard(doc).zones).toHaveLength(1);
	});
});

describe('undo tracks only the user’s own edits', () => {
	test('undo in one replica takes back its own point and leaves the other person’s', () => {
		const { a, b } = pair();
		const undoA = createUndoManager(a);
		const mine = addPoint(a, { x: 1, y: 1 });
		const theirs = addPoint(b, { x: 2, y: 2 });
		expect(
			readBoard(a)
				.points.map((p) => p.id)
				.sort()
		).toEqual([mine, theirs].sort());
		undoA.undo();
		expect(readBoard(a).points.map((p) => p.id)).toEqual([theirs]);
		expect(readBoard(b).points.map((p) => p.id)).toEqual([theirs]);
		undoA.redo();
		expect(
			readBoard(b)
				.points.map((p) => p.id)
				.sort()
		).toEqual([mine, theirs].sort());
	});

	test('undo of a field edit restores the user’s previous value, not a peer’s later edit of another field', () => {
		const { a, b } = pair();
		const undoA = createUndoManager(a);
		const id = addPoint(a, { x: 1, y: 1 });
		undoA.stopCapturing();
		updatePoint(a, id, { flatDiameterMm: 35 });
		updatePoint(b, id, { wallThicknessMm: 18 });
		undoA.undo();
		const [p] = readBoard(b).points;
		expect(p.flatDiameterMm).toBeNull();
		expect(p.wallThicknessMm).toBe(18);
	});

	test('edits applied with another origin (server, offline store) are not on the undo stack', () => {
		const doc = new Y.Doc();
		const undo = createUndoManager(doc);
		addPoint(doc, { x: 1, y: 1 }, 'server');
		expect(undo.undoStack).toHaveLength(0);
		addPoint(doc, { x: 2, y: 2 }, LOCAL_ORIGIN);
		expect(undo.undoStack).toHaveLength(1);
	});

	test('concurrent edits of different fields of one point both survive', () => {
		const a = new Y.Doc();
		const id = addPoint(a, { x: 1, y: 1 });
		const b = new Y.Doc();
		Y.applyUpdate(b, Y.encodeStateAsUpdate(a));
		updatePoint(a, id, { surface: 'cast_housing' });
		updatePoint(b, id, { mounting: 'bonded_pad' });
		Y.applyUpdate(a, Y.encodeStateAsUpdate(b));
		Y.applyUpdate(b, Y.encodeStateAsUpdate(a));
		expect(readBoard(a).points[0]).toMatchObject({ surface: 'cast_housing', mounting: 'bonded_pad' });
		expect(readBoard(b)).toEqual(readBoard(a));
	});
});

describe('review decisions', () => {
	test('the status field records who decided and when; reopening clears it', async () => {
		const { statusCommit } = await import('../../../src/lib/board/panel/commit');
		const doc = new Y.Doc();
		const id = addPoint(doc, { x: 1, y: 1 });
		const commit = statusCommit(doc, id, { userId: 'u-esme', name: 'Esme' });
		expect(commit('approved')).toBeNull();
		const [p] = readBoard(doc).points;
		expect(p).toMatchObject({ status: 'approved', decidedBy: 'u-esme', decidedByName: 'Esme' });
		expect(Math.abs(p.decidedAt! - Date.now())).toBeLessThan(60_000);
		expect(commit('done')).toMatch(/Status: choose/);
		expect(commit('proposed')).toBeNull();
		expect(readBoard(doc).points[0]).toMatchObject({ status: 'proposed', decidedBy: null, decidedByName: null, decidedAt: null });
		// A point never decided keeps no decision keys at all.
		const other = addPoint(doc, { x: 2, y: 2 });
		statusCommit(doc, other, { userId: 'u-tam', name: 'Tam' })('proposed');
		expect(maps(doc).points.get(other)!.has('decidedBy')).toBe(false);
	});
});

describe('reading fields: a value parsed once per schema gives what parsing it gives', () => {
	test('the same values on many points read alike, trimmed and checked each time', () => {
		const doc = new Y.Doc();
		const ids = [1, 2, 3].map((i) => addPoint(doc, { x: i, y: i, label: `P${i}`, component: 'motor DE' }));
		const m = maps(doc).points;
		m.get(ids[0])!.set('component', '  motor DE  ');
		m.get(ids[1])!.set('component', '  motor DE  ');
		m.get(ids[2])!.set('flatDiameterMm', -0);
		m.get(ids[1])!.set('flatDiameterMm', 'forty');
		const read = ids.map((id) => readPoint(id, m.get(id)!)!);
		expect(read.map((p) => p.component)).toEqual(['motor DE', 'motor DE', 'motor DE']);
		expect(read[1].flatDiameterMm).toBeNull();
		expect(Object.is(read[2].flatDiameterMm, -0)).toBe(true);
	});
});
