import { DEFAULT_COLLAB_OPTIONS } from '../../../src/lib/server/collab/config';
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import * as Y from 'yjs';
import {
	addPoint,
	addRoute,
	addZone,
	applyLocalChecked,
	BOARD_WRITE_ROLES,
	checkBoardChange,
	clearScale,
	cloneDoc,
	createUndoManager,
	decidePoint,
	DEFAULT_BOARD_LIMITS,
	deletePoint,
	deleteRoute,
	deleteZone,
	LOCAL_ORIGIN,
	maps,
	movePoint,
	readBoard,
	REVIEW_DECIDE_ROLES,
	setRouteVertices,
	setScale,
	setZonePolygon,
	updatePoint,
	updateRoute,
	updateZone,
	type BoardActor,
	type BoardPolicyContext,
	type BoardPolicyResult
} from '../../../src/lib/board/model';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { PERMISSIONS } from '../../../src/lib/server/auth/guard';
import { writeDemoBoard } from '../../../src/lib/server/db/seed-board';

const esme: BoardActor = { role: 'engineer', userId: 'u-esme', name: 'Esme' };
const admin: BoardActor = { role: 'admin', userId: 'u-ada', name: 'Ada' };
const tam: BoardActor = { role: 'technician', userId: 'u-tam', name: 'Tam' };
const vic: BoardActor = { role: 'viewer', userId: 'u-vic', name: 'Vic' };

/** 2 Dec 2026, 10:42 UTC: when Esme decided. */
const DECIDED_AT = Date.UTC(2026, 11, 2, 10, 42);
const ctx: BoardPolicyContext = { frozen: false, now: DECIDED_AT + 3_600_000, timeZone: 'UTC' };

/** The update a client sends after making `fn`'s change on its replica of `base`. */
function changeOf(base: Y.Doc, fn: (d: Y.Doc) => void): Uint8Array {
	const d = cloneDoc(base);
	const updates: Uint8Array[] = [];
	d.on('update', (u: Uint8Array) => updates.push(u));
	fn(d);
	return Y.mergeUpdates(updates);
}

function check(base: Y.Doc, actor: BoardActor, fn: (d: Y.Doc) => void, c: BoardPolicyContext = ctx): BoardPolicyResult {
	return checkBoardChange(base, changeOf(base, fn), actor, c);
}

function codes(r: BoardPolicyResult): string[] {
	return r.ok ? [] : r.refusals.map((x) => x.code);
}

/**
 * A board under review: P1 approved by Esme at 10:42 with its cable route, P2 flagged, P3 rejected,
 * P4 still proposed with a route, a keep-out zone and a scale.
 */
function reviewedBoard() {
	const doc = new Y.Doc();
	setScale(doc, { a: [0, 0], b: [200, 0], lengthMm: 500 });
	const p1 = addPoint(doc, { x: 10, y: 10, createdBy: 'Tam', surface: 'machined_housing', mounting: 'stud', flatDiameterMm: 35 });
	const p2 = addPoint(doc, { x: 50, y: 10, createdBy: 'Tam' });
	const p3 = addPoint(doc, { x: 90, y: 10, createdBy: 'Tam' });
	const p4 = addPoint(doc, { x: 130, y: 10, createdBy: 'Tam' });
	const r1 = addRoute(doc, {
		pointId: p1,
		vertices: [
			[10, 10],
			[10, 200]
		],
		crossSectionMm2: 0.75
	});
	const r4 = addRoute(doc, {
		pointId: p4,
		vertices: [
			[130, 10],
			[130, 200]
		]
	});
	const z = addZone(doc, {
		polygon: [
			[300, 300],
			[400, 300],
			[400, 400]
		],
		kind: 'coupling'
	});
	decidePoint(doc, p1, 'approved', { userId: esme.userId, name: esme.name }, DECIDED_AT);
	decidePoint(doc, p2, 'flagged', { userId: esme.userId, name: esme.name }, DECIDED_AT);
	decidePoint(doc, p3, 'rejected', { userId: esme.userId, name: esme.name }, DECIDED_AT - 86_400_000);
	return { doc, p1, p2, p3, p4, r1, r4, z };
}

test('the roles the policy replicates are those of the guard', () => {
	expect([...BOARD_WRITE_ROLES].sort()).toEqual([...PERMISSIONS['board.write']].sort());
	expect([...REVIEW_DECIDE_ROLES].sort()).toEqual([...PERMISSIONS['review.decide']].sort());
});

test('the policy is shared code: it imports no server module and does no I/O', () => {
	const src = readFileSync(join(__dirname, '../../../src/lib/board/model/policy.ts'), 'utf8');
	const imports = [...src.matchAll(/from '([^']+)'/g)].map((m) => m[1]);
	expect(imports.sort()).toEqual(['../../schemas/board', './schema', 'yjs', 'zod'].sort());
});

describe('review decisions are protected from technicians', () => {
	test('deleting an approved point (and with it its route) is refused with who decided and when', () => {
		const { doc, p1, r1 } = reviewedBoard();
		const r = check(doc, tam, (d) => deletePoint(d, p1));
		expect(r.ok).toBe(false);
		if (r.ok) return;
		const point = r.refusals.find((x) => x.id === p1)!;
		expect(point).toMatchObject({
			kind: 'point',
			code: 'rights.decided-point',
			decision: { status: 'approved', byName: 'Esme', at: DECIDED_AT }
		});
		expect(point.reason).toBe('P1 was approved by Esme at 10:42 and cannot be deleted; ask Esme to reopen it.');
		expect(r.refusals.find((x) => x.id === r1)).toMatchObject({ kind: 'route', code: 'rights.decided-route' });
	});

	test("deleting, editing or adding to an approved point's cable route is refused", () => {
		const { doc, p1, r1 } = reviewedBoard();
		expect(codes(check(doc, tam, (d) => deleteRoute(d, r1)))).toEqual(['rights.decided-route']);
		expect(codes(check(doc, tam, (d) => updateRoute(d, r1, { lengthEnteredM: 3 })))).toEqual(['rights.decided-route']);
		expect(
			codes(
				check(doc, tam, (d) =>
					setRouteVertices(d, r1, [
						[10, 10],
						[0, 0]
					])
				)
			)
		).toEqual(['rights.decided-route']);
		const added = check(doc, tam, (d) =>
			addRoute(d, {
				pointId: p1,
				vertices: [
					[10, 10],
					[20, 20]
				]
			})
		);
		expect(codes(added)).toEqual(['rights.decided-route']);
		expect(added.ok ? '' : added.refusals[0].reason).toMatch(/^P1 was approved by Esme at 10:42 and takes no new cable route/);
	});

	test("changing an approved point's flat seat to 10 mm, or moving it, is refused", () => {
		const { doc, p1 } = reviewedBoard();
		const r = check(doc, tam, (d) => updatePoint(d, p1, { flatDiameterMm: 10 }));
		expect(r).toMatchObject({ ok: false, refusals: [{ kind: 'point', id: p1, field: 'flatDiameterMm', code: 'rights.decided-point' }] });
		expect(r.ok ? '' : r.refusals[0].reason).toBe('P1 was approved by Esme at 10:42 and cannot be changed; ask Esme to reopen it.');
		expect(codes(check(doc, tam, (d) => movePoint(d, p1, 400, 400)))).toContain('rights.decided-point');
	});

	test('a flagged point may be moved and reworked by the technician, but not deleted', () => {
		const { doc, p2 } = reviewedBoard();
		expect(check(doc, tam, (d) => movePoint(d, p2, 260, 140))).toEqual({ ok: true });
		expect(check(doc, tam, (d) => updatePoint(d, p2, { surface: 'cast_housing' }))).toEqual({ ok: true });
		expect(check(doc, tam, (d) => deletePoint(d, p2))).toMatchObject({ ok: false, refusals: [{ id: p2, code: 'rights.decided-point' }] });
	});

	test('resetting a flagged or rejected point to proposed is refused', () => {
		const { doc, p2, p3 } = reviewedBoard();
		const flagged = check(doc, tam, (d) => updatePoint(d, p2, { status: 'proposed' }));
		expect(flagged).toMatchObject({ ok: false, refusals: [{ id: p2, field: 'status', code: 'rights.decided-point' }] });
		expect(flagged.ok ? '' : flagged.refusals[0].reason).toBe(
			'P2 was flagged for a look by Esme at 10:42 and can only be reopened by an engineer; ask Esme to reopen it.'
		);
		const rejected = check(doc, tam, (d) => updatePoint(d, p3, { status: 'proposed' }));
		expect(rejected.ok ? '' : rejected.refusals[0].reason).toBe(
			'P3 was rejected by Esme on 1 Dec 2026 at 10:42 and can only be reopened by an engineer; ask Esme to reopen it.'
		);
		// Clearing the record of who decided is the same thing.
		expect(codes(check(doc, tam, (d) => maps(d).points.get(p2)!.set('decidedBy', null)))).toEqual(['rights.decided-point']);
	});

	test('writing a decision is refused, on an existing point or a new one', () => {
		const { doc, p4 } = reviewedBoard();
		for (const status of ['approved', 'flagged', 'rejected'] as const) {
			const r = check(doc, tam, (d) => updatePoint(d, p4, { status }));
			expect(r).toMatchObject({ ok: false, refusals: [{ id: p4, field: 'status', code: 'rights.decide' }] });
		}
		expect(codes(check(doc, tam, (d) => addPoint(d, { x: 1, y: 1, status: 'approved' })))).toEqual(['rights.decide']);
		expect(codes(check(doc, tam, (d) => decidePoint(d, p4, 'approved', { userId: tam.userId, name: tam.name })))).toEqual([
			'rights.decide'
		]);
		// A stamp without the status is refused as well.
		expect(codes(check(doc, tam, (d) => maps(d).points.get(p4)!.set('decidedByName', 'Esme')))).toEqual(['rights.decide']);
	});

	test('replacing an approved point with a copy of itself is refused', () => {
		const { doc, p1 } = reviewedBoard();
		const r = check(doc, tam, (d) => {
			const old = maps(d).points.get(p1)!;
			const copy = new Y.Map<unknown>();
			const fields = old.toJSON();
			maps(d).points.set(p1, copy);
			for (const [k, v] of Object.entries(fields)) copy.set(k, v);
		});
		expect(codes(r)).toEqual(['rights.decided-point']);
	});

	test('changing the scale while a point is approved is refused', () => {
		const { doc } = reviewedBoard();
		const r = check(doc, tam, (d) => setScale(d, { a: [0, 0], b: [100, 0], lengthMm: 500 }));
		expect(r).toMatchObject({ ok: false, refusals: [{ kind: 'scale', code: 'rights.scale' }] });
		expect(codes(check(doc, tam, (d) => clearScale(d)))).toEqual(['rights.scale']);
	});

	test('a decision made without a name (older boards) still protects the point', () => {
		const doc = new Y.Doc();
		const p = addPoint(doc, { x: 1, y: 1 });
		updatePoint(doc, p, { status: 'approved' });
		const r = check(doc, tam, (d) => updatePoint(d, p, { notes: 'x' }));
		expect(r.ok ? '' : r.refusals[0].reason).toBe('P1 was approved by an engineer and cannot be changed; ask an engineer to reopen it.');
	});

	test('an engineer or admin may do all of it', () => {
		for (const who of [esme, admin]) {
			const { doc, p1, p2, p3, p4, r1 } = reviewedBoard();
			const ops: Array<(d: Y.Doc) => unknown> = [
				(d) => deletePoint(d, p1),
				(d) => deleteRoute(d, r1),
				(d) => updateRoute(d, r1, { lengthEnteredM: 3 }),
				(d) =>
					addRoute(d, {
						pointId: p1,
						vertices: [
							[10, 10],
							[20, 20]
						]
					}),
				(d) => updatePoint(d, p1, { flatDiameterMm: 10 }),
				(d) => movePoint(d, p1, 400, 400),
				(d) => updatePoint(d, p2, { status: 'proposed' }),
				(d) => decidePoint(d, p3, 'proposed', who),
				(d) => decidePoint(d, p4, 'approved', who),
				(d) => addPoint(d, { x: 1, y: 1, status: 'approved' }),
				(d) => setScale(d, { a: [0, 0], b: [100, 0], lengthMm: 500 }),
				(d) => clearScale(d)
			];
			for (const op of ops) expect(check(doc, who, op)).toEqual({ ok: true });
		}
	});

	test('reopening clears who decided; deciding again records the new decider', () => {
		const { doc, p1 } = reviewedBoard();
		decidePoint(doc, p1, 'proposed', esme);
		expect(readBoard(doc).points.find((p) => p.id === p1)).toMatchObject({
			status: 'proposed',
			decidedBy: null,
			decidedByName: null,
			decidedAt: null
		});
		// Reopened: the technician may change it again.
		expect(check(doc, tam, (d) => updatePoint(d, p1, { flatDiameterMm: 10 }))).toEqual({ ok: true });
		decidePoint(doc, p1, 'flagged', admin, 5);
		expect(readBoard(doc).points.find((p) => p.id === p1)).toMatchObject({
			status: 'flagged',
			decidedBy: 'u-ada',
			decidedByName: 'Ada',
			decidedAt: 5
		});
	});
});

describe('a technician surveys freely', () => {
	test('placing, editing, moving and deleting undecided points, routes and zones is accepted', () => {
		const { doc, p4, r4, z } = reviewedBoard();
		const ops: Array<(d: Y.Doc) => unknown> = [
			(d) => addPoint(d, { x: 5, y: 5, createdBy: 'Tam', surface: 'cast_housing', notes: 'by the coupling guard' }),
			(d) => updatePoint(d, p4, { flatDiameterMm: 10, mounting: 'bonded_pad', label: 'P4a', status: 'proposed' }),
			(d) => movePoint(d, p4, 140, 20),
			(d) => updateRoute(d, r4, { lengthEnteredM: 12, crossSectionMm2: 1.5, fixings: 'ties' }),
			(d) =>
				setRouteVertices(d, r4, [
					[130, 10],
					[0, 300]
				]),
			(d) => deleteRoute(d, r4),
			(d) => deletePoint(d, p4),
			(d) =>
				addRoute(d, {
					pointId: p4,
					vertices: [
						[130, 10],
						[500, 500]
					]
				}),
			(d) =>
				addZone(d, {
					polygon: [
						[0, 0],
						[5, 0],
						[5, 5]
					],
					kind: 'fan'
				}),
			(d) => updateZone(d, z, { label: 'Coupling' }),
			(d) =>
				setZonePolygon(d, z, [
					[0, 0],
					[9, 0],
					[9, 9]
				]),
			(d) => deleteZone(d, z)
		];
		for (const op of ops) expect(check(doc, tam, op)).toEqual({ ok: true });
	});

	test('marking up the whole demo board in one go (as an offline sync would send it) is accepted', () => {
		const empty = new Y.Doc();
		const r = check(empty, tam, (d) => writeDemoBoard(d, { createdBy: 'u-tam', supplyPointId: 'a1b2c3d4-0000-4000-8000-000000000001' }));
		expect(r).toEqual({ ok: true });
	});

	test('a sync after working offline, which resends every deletion the device knows, is accepted', () => {
		const { doc, p1, p4 } = reviewedBoard();
		// History on the decided point: overwritten values leave deletions behind.
		updatePoint(doc, p1, { notes: 'first' });
		updatePoint(doc, p1, { notes: 'second' });
		const device = cloneDoc(doc);
		updatePoint(device, p4, { notes: 'measured offline', surfaceTempC: 48 });
		addPoint(device, { x: 300, y: 300, createdBy: 'Tam' });
		// What the provider sends as sync step 2: all the server lacks, plus the whole delete set.
		const step2 = Y.encodeStateAsUpdate(device, Y.encodeStateVector(doc));
		expect(checkBoardChange(doc, step2, tam, ctx)).toEqual({ ok: true });
		// And a full state from a device that has nothing new is nothing to check, even for a viewer.
		expect(checkBoardChange(doc, Y.encodeStateAsUpdate(cloneDoc(doc)), vic, ctx)).toEqual({ ok: true });
	});

	test('setting the scale is accepted while no point is approved', () => {
		const doc = new Y.Doc();
		addPoint(doc, { x: 1, y: 1 });
		expect(check(doc, tam, (d) => setScale(d, { a: [0, 0], b: [10, 0], lengthMm: 100 }))).toEqual({ ok: true });
	});

	test('undo of their own delete of an undecided point is accepted', () => {
		const doc = new Y.Doc();
		const p = addPoint(doc, { x: 1, y: 1 });
		addRoute(doc, {
			pointId: p,
			vertices: [
				[1, 1],
				[2, 2]
			]
		});
		const client = cloneDoc(doc);
		const undo = createUndoManager(client);
		deletePoint(client, p);
		Y.applyUpdate(doc, Y.encodeStateAsUpdate(client, Y.encodeStateVector(doc)));
		const updates: Uint8Array[] = [];
		client.on('update', (u: Uint8Array) => updates.push(u));
		undo.undo();
		expect(readBoard(client).points).toHaveLength(1);
		expect(checkBoardChange(doc, Y.mergeUpdates(updates), tam, ctx)).toEqual({ ok: true });
	});
});

describe('viewers and frozen boards', () => {
	test('a viewer changes nothing', () => {
		const { doc, p4 } = reviewedBoard();
		for (const op of [
			(d: Y.Doc) => addPoint(d, { x: 1, y: 1 }),
			(d: Y.Doc) => updatePoint(d, p4, { notes: 'x' }),
			(d: Y.Doc) => deletePoint(d, p4)
		]) {
			const r = check(doc, vic, op);
			expect(r).toMatchObject({ ok: false, refusals: [{ kind: 'document', code: 'rights.read-only' }] });
			expect(r.ok ? '' : r.refusals[0].reason).toMatch(/Viewers can look at the board but not change it/);
		}
		expect(codes(check(doc, { ...vic, role: 'stranger' }, (d) => addPoint(d, { x: 1, y: 1 })))).toEqual(['rights.read-only']);
	});

	test("a viewer's client resending what the board already has is accepted (nothing changes)", () => {
		const { doc } = reviewedBoard();
		expect(checkBoardChange(doc, Y.encodeStateAsUpdate(doc), vic, ctx)).toEqual({ ok: true });
	});

	test('a frozen board takes nothing, not even from an engineer', () => {
		const { doc, p4 } = reviewedBoard();
		for (const who of [tam, esme]) {
			const r = check(doc, who, (d) => updatePoint(d, p4, { notes: 'x' }), { ...ctx, frozen: true });
			expect(codes(r)).toEqual(['rights.frozen']);
		}
	});
});

describe('the schema of every item', () => {
	const raw = (doc: Y.Doc, id: string, key: string, value: unknown) => check(doc, esme, (d) => maps(d).points.get(id)!.set(key, value));

	test('a distance as a string is refused with the field named', () => {
		const { doc, p4 } = reviewedBoard();
		const r = raw(doc, p4, 'distanceToBearingMm', '40');
		expect(r).toMatchObject({ ok: false, refusals: [{ kind: 'point', id: p4, field: 'distanceToBearingMm', code: 'schema.value' }] });
		expect(r.ok ? '' : r.refusals[0].reason).toBe('P4: Distance to bearing: enter a number in mm.');
	});

	test('a 990 KB label is refused', () => {
		const { doc, p4 } = reviewedBoard();
		// Over the largest update a board takes, it is refused before it is read...
		expect(codes(raw(doc, p4, 'label', 'x'.repeat(990 * 1024)))).toEqual(['limit.update-bytes']);
		// ...and under it, by the label's own schema.
		const r = raw(doc, p4, 'label', 'x'.repeat(100 * 1024));
		expect(r).toMatchObject({ ok: false, refusals: [{ field: 'label', code: 'schema.value' }] });
		expect(codes(raw(doc, p4, 'notes', 'x'.repeat(2001)))).toEqual(['schema.value']);
		expect(raw(doc, p4, 'notes', 'x'.repeat(2000))).toEqual({ ok: true });
	});

	test('NaN, Infinity and far-away coordinates are refused', () => {
		const { doc, p4, r4 } = reviewedBoard();
		expect(codes(raw(doc, p4, 'x', Number.NaN))).toEqual(['schema.value']);
		expect(codes(raw(doc, p4, 'y', Number.POSITIVE_INFINITY))).toEqual(['schema.value']);
		expect(codes(raw(doc, p4, 'x', 1e9))).toEqual(['schema.value']);
		expect(codes(raw(doc, p4, 'surfaceTempC', Number.NaN))).toEqual(['schema.value']);
		expect(
			codes(
				check(doc, esme, (d) =>
					maps(d)
						.routes.get(r4)!
						.set('vertices', [
							[0, 0],
							[Number.NaN, 1]
						])
				)
			)
		).toEqual(['schema.value']);
		const many = Array.from({ length: 501 }, (_, i) => [i, i]);
		expect(codes(check(doc, esme, (d) => maps(d).routes.get(r4)!.set('vertices', many)))).toEqual(['schema.value']);
		expect(
			codes(
				check(doc, esme, (d) =>
					maps(d)
						.routes.get(r4)!
						.set('vertices', [[0, 0]])
				)
			)
		).toEqual(['schema.value']);
	});

	test('unknown keys in an item, a nested Yjs type or binary in a field, and removed fields are refused', () => {
		const { doc, p4, r4, z } = reviewedBoard();
		const r = raw(doc, p4, 'hack', 1);
		expect(r).toMatchObject({ ok: false, refusals: [{ kind: 'point', id: p4, field: 'hack', code: 'schema.unknown-key' }] });
		expect(codes(check(doc, esme, (d) => maps(d).routes.get(r4)!.set('colour', 'red')))).toEqual(['schema.unknown-key']);
		expect(codes(check(doc, esme, (d) => maps(d).zones.get(z)!.set('x', 1)))).toEqual(['schema.unknown-key']);
		expect(codes(raw(doc, p4, 'notes', new Y.Text('hi')))).toEqual(['schema.value']);
		expect(codes(raw(doc, p4, 'notes', new Uint8Array([1, 2])))).toEqual(['schema.value']);
		expect(codes(check(doc, esme, (d) => maps(d).points.get(p4)!.delete('status')))).toEqual(['schema.removed-key']);
		expect(codes(check(doc, esme, (d) => maps(d).points.get(p4)!.delete('x')))).toEqual(['schema.removed-key']);
	});

	test('an item that is not a map, or lacks what the board needs to show it, is refused', () => {
		const { doc, p4 } = reviewedBoard();
		expect(codes(check(doc, esme, (d) => maps(d).points.set('p9', 'just text' as never)))).toEqual(['schema.item']);
		expect(
			codes(
				check(doc, esme, (d) => {
					const m = new Y.Map<unknown>();
					maps(d).points.set('p9', m);
					m.set('label', 'P9');
				})
			)
		).toEqual(['schema.missing-key', 'schema.missing-key']);
		expect(
			codes(
				check(doc, esme, (d) => {
					const m = new Y.Map<unknown>();
					maps(d).routes.set('r9', m);
					m.set('pointId', 'nowhere');
					m.set('vertices', [
						[0, 0],
						[1, 1]
					]);
				})
			)
		).toEqual(['schema.route-point']);
		// A route may not be moved to another point unchecked either.
		expect(
			codes(
				check(doc, esme, (d) => {
					const m = new Y.Map<unknown>();
					maps(d).routes.set('r9', m);
					m.set('pointId', p4);
				})
			)
		).toEqual(['schema.missing-key']);
	});

	test('item ids and references are short, plain strings', () => {
		const { doc, r4 } = reviewedBoard();
		const withId = (id: string) =>
			check(doc, esme, (d) => {
				const m = new Y.Map<unknown>();
				maps(d).zones.set(id, m);
				m.set('polygon', [
					[0, 0],
					[1, 0],
					[1, 1]
				]);
			});
		expect(withId('a1b2c3d4e5f6a1b2c3d4e5f6')).toEqual({ ok: true });
		expect(codes(withId('z'.repeat(500_000)))).toEqual(['schema.item']);
		expect(codes(withId('<img src=x>'))).toEqual(['schema.item']);
		expect(codes(check(doc, esme, (d) => maps(d).routes.get(r4)!.set('supplyPointId', 's'.repeat(5000))))).toEqual(['schema.value']);
	});

	test('edits inside a nested type stored by an older client are seen', () => {
		const doc = new Y.Doc();
		const p = addPoint(doc, { x: 1, y: 1 });
		updatePoint(doc, p, { status: 'approved' });
		// Stored before the policy existed: a Y.Array in a point.
		maps(doc).points.get(p)!.set('legacy', new Y.Array<number>());
		const r = check(doc, tam, (d) => (maps(d).points.get(p)!.get('legacy') as Y.Array<number>).push([1]));
		expect(codes(r)).toContain('rights.decided-point');
		const e = check(doc, esme, (d) => (maps(d).points.get(p)!.get('legacy') as Y.Array<number>).push([1]));
		expect(codes(e)).toEqual(['schema.unknown-key']);
		// Removing the stray key is a welcome clean-up.
		expect(check(doc, esme, (d) => maps(d).points.get(p)!.delete('legacy'))).toEqual({ ok: true });
	});

	test('the scale must be a reference line and a length, nothing more', () => {
		const doc = new Y.Doc();
		const meta = (v: unknown) => check(doc, esme, (d) => maps(d).meta.set('scale', v));
		expect(meta({ a: [0, 0], b: [10, 0], lengthMm: 100 })).toEqual({ ok: true });
		expect(codes(meta({ a: [0, 0], b: [10, 0], lengthMm: 'long' }))).toEqual(['schema.value']);
		expect(codes(meta({ a: [0, 0], b: [0, 0], lengthMm: 100 }))).toEqual(['schema.value']);
		expect(codes(meta({ a: [0, 0], b: [10, 0], lengthMm: 100, pad: 'x'.repeat(1000) }))).toEqual(['schema.value']);
		// lib0 decodes "__proto__" into the prototype: a value the schema might read through.
		expect(codes(meta(JSON.parse('{"a":[0,0],"b":[10,0],"__proto__":{"lengthMm":100}}')))).toEqual(['schema.value']);
		expect(codes(check(doc, esme, (d) => maps(d).meta.set('theme', 'dark')))).toEqual(['schema.unknown-key']);
	});

	test('unknown root types are refused, however they are made', () => {
		const doc = reviewedBoard().doc;
		const r = check(doc, esme, (d) => d.getMap('evil').set('a', 1));
		expect(r).toMatchObject({ ok: false, refusals: [{ kind: 'document', id: 'evil', code: 'document.unknown-root' }] });
		expect(codes(check(doc, esme, (d) => d.getArray('junk').push([1, 2, 3])))).toEqual(['document.unknown-root']);
		expect(codes(check(doc, esme, (d) => d.getText('t').insert(0, 'x')))).toEqual(['document.unknown-root']);
		// 150 of them in one update, as a bit-mutated update made.
		const many = check(doc, esme, (d) => {
			for (let i = 0; i < 150; i++) d.getMap(`r${i}`).set('k', i);
		});
		expect(codes(many).length).toBeGreaterThan(0);
		expect(codes(many).every((c) => c === 'document.unknown-root')).toBe(true);
		// Array-style content under a model root is refused too.
		expect(codes(check(doc, esme, (d) => d.getArray('points').insert(0, [1])))).not.toEqual([]);
	});
});

describe('limits', () => {
	test('100,000 points are refused', () => {
		const doc = new Y.Doc();
		const update = changeOf(doc, (d) =>
			d.transact(() => {
				for (let i = 0; i < 100_000; i++) {
					const m = new Y.Map<unknown>();
					maps(d).points.set(`p${i}`, m);
					m.set('x', i % 1000);
					m.set('y', 1);
				}
			})
		);
		expect(codes(checkBoardChange(doc, update, esme, ctx))).toEqual(['limit.update-bytes']);
		const roomy = { ...ctx, limits: { maxUpdateBytes: 64 * 1024 * 1024, maxDocumentBytes: 64 * 1024 * 1024 } };
		const r = checkBoardChange(doc, update, esme, roomy);
		expect(r).toMatchObject({ ok: false, refusals: [{ code: 'limit.points' }] });
		expect(r.ok ? '' : r.refusals[0].reason).toBe('A board holds at most 2,000 points; this change would make 100,000.');
	}, 60_000); // building 100,000 Yjs maps takes seconds on a shared machine

	test('counts over the limit are refused; taking items away from a full board is not', () => {
		const doc = new Y.Doc();
		const c = { ...ctx, limits: { maxPoints: 3, maxRoutes: 1, maxZones: 1 } };
		for (let i = 0; i < 3; i++) addPoint(doc, { x: i, y: i });
		const [p] = readBoard(doc).points;
		expect(codes(check(doc, tam, (d) => addPoint(d, { x: 9, y: 9 }), c))).toEqual(['limit.points']);
		addRoute(doc, {
			pointId: p.id,
			vertices: [
				[0, 0],
				[1, 1]
			]
		});
		expect(
			codes(
				check(
					doc,
					tam,
					(d) =>
						addRoute(d, {
							pointId: p.id,
							vertices: [
								[0, 0],
								[2, 2]
							]
						}),
					c
				)
			)
		).toEqual(['limit.routes']);
		addZone(doc, {
			polygon: [
				[0, 0],
				[1, 0],
				[1, 1]
			]
		});
		expect(
			codes(
				check(
					doc,
					tam,
					(d) =>
						addZone(d, {
							polygon: [
								[0, 0],
								[2, 0],
								[2, 2]
							]
						}),
					c
				)
			)
		).toEqual(['limit.zones']);
		// Over the limit already (the limit was lowered): deleting is fine, adding is not.
		const lower = { ...ctx, limits: { maxPoints: 1 } };
		expect(check(doc, tam, (d) => deletePoint(d, p.id), lower)).toEqual({ ok: true });
		expect(check(doc, tam, (d) => updatePoint(d, p.id, { notes: 'x' }), lower)).toEqual({ ok: true });
	});

	test('the default limits are the live board’s defaults, so browser and server agree', () => {
		expect(DEFAULT_BOARD_LIMITS).toEqual({
			...DEFAULT_COLLAB_OPTIONS.boardLimits,
			maxUpdateBytes: DEFAULT_COLLAB_OPTIONS.maxUpdateBytes,
			maxDocumentBytes: DEFAULT_COLLAB_OPTIONS.maxDocumentBytes
		});
		expect(DEFAULT_BOARD_LIMITS.maxPoints).toBe(2000);
	});

	test('an update over the size limit is refused before it is read', () => {
		const doc = new Y.Doc();
		const update = changeOf(doc, (d) => addPoint(d, { x: 1, y: 1, notes: 'n'.repeat(1500) }));
		const r = checkBoardChange(doc, update, esme, { ...ctx, limits: { maxUpdateBytes: 1000 } });
		expect(codes(r)).toEqual(['limit.update-bytes']);
		expect(r.ok ? '' : r.refusals[0].reason).toMatch(/^This change is 2 KB; one change may be at most 1000 bytes/);
	});

	test('a document over the size limit is refused, measured exactly', () => {
		const doc = new Y.Doc();
		addPoint(doc, { x: 1, y: 1, notes: 'n'.repeat(1500) });
		const c = { ...ctx, limits: { maxDocumentBytes: 3000 } };
		expect(codes(check(doc, tam, (d) => addPoint(d, { x: 2, y: 2, notes: 'm'.repeat(1500) }), c))).toEqual(['limit.document-bytes']);
		expect(check(doc, tam, (d) => addPoint(d, { x: 2, y: 2 }), c)).toEqual({ ok: true });
		// With the size given by the caller (as the server knows it) the same holds.
		const size = Y.encodeStateAsUpdate(doc).byteLength;
		expect(codes(check(doc, tam, (d) => addPoint(d, { x: 2, y: 2, notes: 'm'.repeat(1500) }), { ...c, documentBytes: size }))).toEqual([
			'limit.document-bytes'
		]);
	});
});

describe('updates that cannot be read', () => {
	test('garbage, truncated updates and updates with a gap are refused, never thrown', () => {
		const { doc } = reviewedBoard();
		expect(codes(checkBoardChange(doc, new Uint8Array([1, 2, 3, 4, 5, 6, 7]), esme, ctx))).toEqual(['document.malformed']);
		const u = changeOf(doc, (d) => addPoint(d, { x: 1, y: 1, notes: 'hello' }));
		expect(checkBoardChange(doc, u.slice(0, u.length - 5), esme, ctx).ok).toBe(false);
		expect(codes(checkBoardChange(doc, 'nope' as never, esme, ctx))).toEqual(['document.malformed']);
		// The second of two changes without the first.
		const client = cloneDoc(doc);
		addPoint(client, { x: 1, y: 1 });
		const sv = Y.encodeStateVector(client);
		addPoint(client, { x: 2, y: 2 });
		expect(codes(checkBoardChange(doc, Y.encodeStateAsUpdate(client, sv), esme, ctx))).toEqual(['document.incomplete']);
	});

	test('the document checked against is left untouched', () => {
		const { doc, p1 } = reviewedBoard();
		const before = Y.encodeStateAsUpdate(doc);
		check(doc, tam, (d) => deletePoint(d, p1));
		check(doc, esme, (d) => deletePoint(d, p1));
		expect(Y.encodeStateAsUpdate(doc)).toEqual(before);
	});
});

describe('a shadow kept in step by the caller', () => {
	test('is used instead of a copy and holds the change after an accepted check', () => {
		const { doc, p4 } = reviewedBoard();
		const shadow = cloneDoc(doc);
		const u1 = changeOf(doc, (d) => updatePoint(d, p4, { notes: 'one' }));
		expect(checkBoardChange(doc, u1, tam, ctx, { shadow })).toEqual({ ok: true });
		expect(readBoard(shadow).points.find((p) => p.id === p4)!.notes).toBe('one');
		Y.applyUpdate(doc, u1);
		const u2 = changeOf(doc, (d) => updatePoint(d, p4, { status: 'approved' }));
		expect(codes(checkBoardChange(doc, u2, tam, ctx, { shadow }))).toEqual(['rights.decide']);
	});
});

describe('applyLocalChecked: the browser checks before it sends', () => {
	test('a refused change never reaches the document; an accepted one is the person’s own, undoable edit', () => {
		const { doc, p1, p4 } = reviewedBoard();
		const clientId = doc.clientID;
		const sent: Array<{ origin: unknown }> = [];
		doc.on('update', (_u: Uint8Array, origin: unknown) => sent.push({ origin }));
		const undo = createUndoManager(doc);
		const before = Y.encodeStateAsUpdate(doc);

		const refused = applyLocalChecked(doc, tam, ctx, (d) => updatePoint(d, p1, { flatDiameterMm: 10 }));
		expect(refused).toMatchObject({ ok: false, value: true, refusals: [{ code: 'rights.decided-point', id: p1 }] });
		expect(Y.encodeStateAsUpdate(doc)).toEqual(before);
		expect(sent).toEqual([]);

		const server = cloneDoc(doc);
		const ok = applyLocalChecked(doc, tam, ctx, (d) => addPoint(d, { x: 7, y: 7, createdBy: 'Tam' }));
		expect(ok.ok).toBe(true);
		const id = ok.value;
		expect(readBoard(doc).points.find((p) => p.id === id)).toMatchObject({ x: 7, y: 7, label: 'P5' });
		expect(sent).toEqual([{ origin: LOCAL_ORIGIN }]);
		expect(doc.clientID).toBe(clientId);
		// The update written is what the server will check.
		expect(ok.ok && ok.update && checkBoardChange(server, ok.update, tam, ctx)).toEqual({ ok: true });
		expect([...Y.decodeUpdate(ok.ok ? ok.update! : new Uint8Array()).structs].every((s) => s.id.client === clientId)).toBe(true);

		// Further changes after remote ones keep working from the same shadow.
		const remote = changeOf(doc, (d) => updatePoint(d, p4, { notes: 'from a peer' }));
		Y.applyUpdate(doc, remote, 'server');
		expect(applyLocalChecked(doc, tam, ctx, (d) => updatePoint(d, p4, { label: 'P4b' })).ok).toBe(true);
		expect(readBoard(doc).points.find((p) => p.id === p4)).toMatchObject({ notes: 'from a peer', label: 'P4b' });

		undo.stopCapturing();
		undo.undo();
		expect(readBoard(doc).points.find((p) => p.id === p4)!.label).toBe('P4');
	});

	test('an error thrown by the change is passed on and the document stays as it was', () => {
		const { doc, p4 } = reviewedBoard();
		const before = Y.encodeStateAsUpdate(doc);
		expect(() => applyLocalChecked(doc, tam, ctx, (d) => updatePoint(d, p4, { flatDiameterMm: -3 }))).toThrow();
		expect(Y.encodeStateAsUpdate(doc)).toEqual(before);
		expect(applyLocalChecked(doc, tam, ctx, (d) => updatePoint(d, p4, { flatDiameterMm: 3 })).ok).toBe(true);
	});

	test('a viewer or a frozen board is told before anything is made', () => {
		const { doc, p4 } = reviewedBoard();
		expect(applyLocalChecked(doc, vic, ctx, (d) => updatePoint(d, p4, { notes: 'x' }))).toMatchObject({
			ok: false,
			refusals: [{ code: 'rights.read-only' }]
		});
		expect(applyLocalChecked(doc, esme, { ...ctx, frozen: true }, (d) => updatePoint(d, p4, { notes: 'x' }))).toMatchObject({
			ok: false,
			refusals: [{ code: 'rights.frozen' }]
		});
		expect(readBoard(doc).points.find((p) => p.id === p4)!.notes).toBe('');
	});
});

// --- properties ---------------------------------------------------------------------------

const vec = fc.tuple(fc.integer({ min: 0, max: 2000 }), fc.integer({ min: 0, max: 2000 }));
const pointPatch = fc.record(
	{
		label: fc.string({ minLength: 1, maxLength: 10 }).filter((s) => s.trim() !== ''),
		notes: fc.string({ maxLength: 50 }),
		flatDiameterMm: fc.option(fc.double({ min: 0, max: 1000, noNaN: true })),
		surface: fc.option(fc.constantFrom('machined_housing', 'cast_housing', 'sheet_cover')),
		status: fc.constantFrom('proposed', 'flagged', 'rejected', 'approved')
	},
	{ requiredKeys: [] }
);
type Op =
	| { t: 'addPoint'; at: [number, number]; patch: Record<string, unknown> }
	| { t: 'updatePoint'; i: number; patch: Record<string, unknown> }
	| { t: 'movePoint'; i: number; at: [number, number] }
	| { t: 'deletePoint'; i: number }
	| { t: 'addRoute'; i: number; v: Array<[number, number]> }
	| { t: 'deleteRoute'; i: number }
	| { t: 'addZone'; v: Array<[number, number]> }
	| { t: 'deleteZone'; i: number }
	| { t: 'decide'; i: number; status: 'proposed' | 'flagged' | 'rejected' | 'approved' }
	| { t: 'scale'; len: number };
const op: fc.Arbitrary<Op> = fc.oneof(
	fc.record({ t: fc.constant('addPoint' as const), at: vec, patch: pointPatch }),
	fc.record({ t: fc.constant('updatePoint' as const), i: fc.nat(), patch: pointPatch }),
	fc.record({ t: fc.constant('movePoint' as const), i: fc.nat(), at: vec }),
	fc.record({ t: fc.constant('deletePoint' as const), i: fc.nat() }),
	fc.record({ t: fc.constant('addRoute' as const), i: fc.nat(), v: fc.array(vec, { minLength: 2, maxLength: 6 }) }),
	fc.record({ t: fc.constant('deleteRoute' as const), i: fc.nat() }),
	fc.record({ t: fc.constant('addZone' as const), v: fc.array(vec, { minLength: 3, maxLength: 6 }) }),
	fc.record({ t: fc.constant('deleteZone' as const), i: fc.nat() }),
	fc.record({
		t: fc.constant('decide' as const),
		i: fc.nat(),
		status: fc.constantFrom('proposed', 'flagged', 'rejected', 'approved') as fc.Arbitrary<'proposed'>
	}),
	fc.record({ t: fc.constant('scale' as const), len: fc.integer({ min: 1, max: 100_000 }) })
);

function run(d: Y.Doc, o: Op, who: BoardActor) {
	const b = readBoard(d);
	const pick = <T>(xs: T[], i: number) => (xs.length ? xs[i % xs.length] : undefined);
	switch (o.t) {
		case 'addPoint':
			return addPoint(d, { x: o.at[0], y: o.at[1], createdBy: who.name, ...o.patch });
		case 'updatePoint': {
			const p = pick(b.points, o.i);
			return p && updatePoint(d, p.id, o.patch);
		}
		case 'movePoint': {
			const p = pick(b.points, o.i);
			return p && movePoint(d, p.id, o.at[0], o.at[1]);
		}
		case 'deletePoint': {
			const p = pick(b.points, o.i);
			return p && deletePoint(d, p.id);
		}
		case 'addRoute': {
			const p = pick(b.points, o.i);
			return p && addRoute(d, { pointId: p.id, vertices: o.v });
		}
		case 'deleteRoute': {
			const r = pick(b.routes, o.i);
			return r && deleteRoute(d, r.id);
		}
		case 'addZone':
			return addZone(d, { polygon: o.v, kind: 'shaft' });
		case 'deleteZone': {
			const z = pick(b.zones, o.i);
			return z && deleteZone(d, z.id);
		}
		case 'decide': {
			const p = pick(b.points, o.i);
			return p && decidePoint(d, p.id, o.status, who);
		}
		case 'scale':
			return setScale(d, { a: [0, 0], b: [100, 0], lengthMm: o.len });
	}
}

describe('properties', () => {
	test("every valid operation by an engineer is accepted, and the server's copy follows", () => {
		fc.assert(
			fc.property(fc.array(op, { minLength: 1, maxLength: 25 }), fc.constantFrom(esme, admin), (ops, who) => {
				const server = new Y.Doc();
				for (const o of ops) {
					const u = changeOf(server, (d) => run(d, o, who));
					if (u.byteLength <= 2) continue; // the operation found nothing to act on
					expect(checkBoardChange(server, u, who, ctx)).toEqual({ ok: true });
					Y.applyUpdate(server, u);
				}
			}),
			{ numRuns: 60 }
		);
	});

	test("a technician's accepted changes never touch an approved or rejected point or its route, and never un-flag or delete a flagged one", () => {
		fc.assert(
			fc.property(fc.array(op, { minLength: 1, maxLength: 25 }), (ops) => {
				const { doc: server } = reviewedBoard();
				for (const o of ops) {
					const before = readBoard(server);
					const u = changeOf(server, (d) => run(d, o, tam));
					const r = checkBoardChange(server, u, tam, ctx);
					if (!r.ok) continue;
					Y.applyUpdate(server, u);
					const after = readBoard(server);
					for (const p of before.points.filter((x) => x.status === 'flagged')) {
						// A flag asks for rework: the point may change, but stays, and stays flagged.
						expect(after.points.find((x) => x.id === p.id)).toMatchObject({
							status: 'flagged',
							decidedBy: p.decidedBy,
							decidedAt: p.decidedAt
						});
					}
					for (const p of before.points.filter((x) => x.status === 'approved' || x.status === 'rejected')) {
						expect(after.points.find((x) => x.id === p.id)).toEqual(p);
						for (const route of before.routes.filter((x) => x.pointId === p.id))
							expect(after.routes.find((x) => x.id === route.id)).toEqual(route);
						expect(after.routes.filter((x) => x.pointId === p.id)).toHaveLength(before.routes.filter((x) => x.pointId === p.id).length);
					}
					for (const p of after.points) if (!before.points.some((x) => x.id === p.id)) expect(p.status).toBe('proposed');
				}
			}),
			{ numRuns: 60 }
		);
	});

	test('random bytes and bit-flipped updates are refused or accepted, never thrown', () => {
		const { doc, p4 } = reviewedBoard();
		const valid = changeOf(doc, (d) => {
			updatePoint(d, p4, { notes: 'some notes', flatDiameterMm: 33 });
			addPoint(d, { x: 3, y: 4, label: 'P9' });
		});
		fc.assert(
			fc.property(fc.uint8Array({ maxLength: 400 }), (bytes) => {
				const r = checkBoardChange(doc, bytes, tam, ctx);
				expect(typeof r.ok).toBe('boolean');
			}),
			{ numRuns: 300 }
		);
		fc.assert(
			fc.property(
				fc.array(fc.tuple(fc.nat({ max: valid.length - 1 }), fc.integer({ min: 0, max: 7 })), { minLength: 1, maxLength: 4 }),
				(flips) => {
					const bytes = valid.slice();
					for (const [i, bit] of flips) bytes[i] ^= 1 << bit;
					const r = checkBoardChange(doc, bytes, esme, ctx);
					if (r.ok) {
						// Whatever got through reads back as a valid board.
						const copy = cloneDoc(doc);
						Y.applyUpdate(copy, bytes);
						expect([...copy.share.keys()].every((k) => ['points', 'routes', 'zones', 'meta'].includes(k))).toBe(true);
					}
				}
			),
			{ numRuns: 300 }
		);
	});
});
