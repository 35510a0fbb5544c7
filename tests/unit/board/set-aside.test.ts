// Work that was not accepted is compared item by item, tried again, and the rest set aside;
// values set offline that lost to a concurrent edit are reported with both values.
import { describe, expect, test } from 'vitest';
import * as Y from 'yjs';
import { addPoint, addRoute, deletePoint, maps, movePoint, readBoard, updatePoint } from '../../../src/lib/board/model';
import {
	describe as describeEntry,
	diffBoards,
	labelFor,
	reapply,
	unacceptedWork,
	type ChangeCheck
} from '../../../src/lib/board/sync/set-aside';
import { OverwriteWatch, type OverwriteNotice } from '../../../src/lib/board/sync/overwrites';

function copyOf(doc: Y.Doc): Y.Doc {
	const c = new Y.Doc();
	Y.applyUpdate(c, Y.encodeStateAsUpdate(doc));
	return c;
}

/** A server copy with one approved point P1 (route attached) and one proposed point P2. */
function serverBoard() {
	const server = new Y.Doc();
	const p1 = addPoint(server, { x: 100, y: 100, label: 'P1', flatDiameterMm: 40 });
	const p2 = addPoint(server, { x: 300, y: 100, label: 'P2' });
	const r1 = addRoute(server, {
		pointId: p1,
		vertices: [
			[100, 100],
			[400, 400]
		]
	});
	updatePoint(server, p1, { status: 'approved' });
	return { server, p1, p2, r1 };
}

/** Refuses any change to a point the server holds as approved, like the board policy does for a technician. */
const approvedIsLocked: ChangeCheck = (doc, update) => {
	const trial = copyOf(doc);
	const before = readBoard(doc);
	Y.applyUpdate(trial, update);
	const after = readBoard(trial);
	for (const p of before.points.filter((x) => x.status === 'approved')) {
		const now = after.points.find((x) => x.id === p.id);
		if (!now || JSON.stringify(now) !== JSON.stringify(p)) return `${p.label} was approved; ask an engineer to reopen it.`;
	}
	return null;
};

describe('unaccepted work', () => {
	test('only what the person did is found, not a newer change by someone else', () => {
		const { server, p1, p2 } = serverBoard();
		const mine = copyOf(server);
		// Offline: the technician changes P1's flat seat (refused later) and P2's notes (fine).
		updatePoint(mine, p1, { flatDiameterMm: 10 });
		updatePoint(mine, p2, { notes: 'seat needs grinding' });
		// Meanwhile on the server the engineer renames P2.
		updatePoint(server, p2, { label: 'P2-NDE' });
		const diffs = unacceptedWork(mine, server);
		expect(diffs.map((d) => [d.itemId, d.action, d.fields.map((f) => f.field)])).toEqual([
			[p1, 'changed', ['flatDiameterMm']],
			[p2, 'changed', ['notes']]
		]);
		// A plain comparison would also have reported the engineer's rename as the person's.
		expect(
			diffBoards(mine, server)
				.find((d) => d.itemId === p2)!
				.fields.map((f) => f.field)
				.sort()
		).toEqual(['label', 'notes']);
	});

	test('what the check accepts is written again; what it refuses is returned with its reason', () => {
		const { server, p1, p2 } = serverBoard();
		const mine = copyOf(server);
		updatePoint(mine, p1, { flatDiameterMm: 10 });
		updatePoint(mine, p2, { notes: 'seat needs grinding' });
		const added = addPoint(mine, { x: 50, y: 60, label: 'P3' });
		const fresh = copyOf(server);
		const { kept, refused } = reapply(fresh, unacceptedWork(mine, server), approvedIsLocked, 'refused by the server', 'replay');
		expect(kept.map((d) => d.itemId).sort()).toEqual([p2, added].sort());
		expect(refused).toHaveLength(1);
		expect(refused[0].difference.itemId).toBe(p1);
		expect(refused[0].reason).toBe('P1 was approved; ask an engineer to reopen it.');
		const board = readBoard(fresh);
		expect(board.points.find((p) => p.id === p1)!.flatDiameterMm).toBe(40);
		expect(board.points.find((p) => p.id === p2)!.notes).toBe('seat needs grinding');
		expect(board.points.find((p) => p.id === added)!.label).toBe('P3');
	});

	test('a deleted approved point (and its route) is set aside, not lost; without a check everything is', () => {
		const { server, p1, r1 } = serverBoard();
		const mine = copyOf(server);
		deletePoint(mine, p1);
		const diffs = unacceptedWork(mine, server);
		expect(diffs.map((d) => [d.kind, d.action]).sort()).toEqual([
			['point', 'deleted'],
			['route', 'deleted']
		]);
		const fresh = copyOf(server);
		const none = reapply(fresh, diffs, null, 'Only an engineer can change an approved point.', 'replay');
		expect(none.kept).toEqual([]);
		expect(none.refused.map((r) => r.reason)).toEqual([
			'Only an engineer can change an approved point.',
			'Only an engineer can change an approved point.'
		]);
		const point = diffs.find((d) => d.kind === 'point')!;
		expect(point.item).toMatchObject({ label: 'P1', status: 'approved', flatDiameterMm: 40 });
		expect(
			labelFor(
				diffs.find((d) => d.itemId === r1)!,
				server
			)
		).toBe('cable route from P1');
		expect(describeEntry({ ...point, label: 'P1' })).toBe('Deleted P1');
		expect(
			readBoard(fresh)
				.points.map((p) => p.label)
				.sort()
		).toEqual(['P1', 'P2']);
	});

	test('a moved point lists its coordinates; the replay writes under the fresh copy’s own client id', () => {
		const { server, p2 } = serverBoard();
		const mine = copyOf(server);
		movePoint(mine, p2, 320, 140);
		const fresh = copyOf(server);
		const own = fresh.clientID;
		expect(Y.decodeStateVector(Y.encodeStateVector(fresh)).has(own)).toBe(false);
		const { kept } = reapply(fresh, unacceptedWork(mine, server), approvedIsLocked, '', 'replay');
		expect(kept).toHaveLength(1);
		expect(kept[0].fields.map((f) => f.field).sort()).toEqual(['x', 'y']);
		// Written under the fresh copy's own id (Yjs then picks a new one for its next change).
		expect(Y.decodeStateVector(Y.encodeStateVector(fresh)).has(own)).toBe(true);
		expect(Y.decodeStateVector(Y.encodeStateVector(fresh)).has(mine.clientID)).toBe(false);
		const p = readBoard(fresh).points.find((x) => x.id === p2)!;
		expect([p.x, p.y]).toEqual([320, 140]);
	});
});

describe('overwritten offline values', () => {
	test('the person who set a value offline is told when a concurrent edit replaced it, with who did', () => {
		const { server, p2 } = serverBoard();
		const tablet = copyOf(server);
		const notices: OverwriteNotice[] = [];
		const remote = Symbol('server');
		const watch = new OverwriteWatch(
			tablet,
			(o) => o === remote,
			(n) => notices.push(n)
		);
		updatePoint(tablet, p2, { notes: 'from the tablet' });
		// The engineer's concurrent edit of the same field (and who made it), decided to win here.
		const laptop = copyOf(server);
		laptop.clientID = tablet.clientID + 1; // the higher client id wins a concurrent map write in Yjs
		laptop.transact(() => {
			const m = maps(laptop).points.get(p2)!;
			m.set('notes', 'from the laptop');
			m.set('updatedBy', 'Esme Ward');
		});
		// Back online: the server's copy arrives.
		Y.applyUpdate(tablet, Y.encodeStateAsUpdate(laptop, Y.encodeStateVector(tablet)), remote);
		expect(readBoard(tablet).points.find((p) => p.id === p2)!.notes).toBe('from the laptop');
		expect(notices).toHaveLength(1);
		expect(notices[0]).toMatchObject({
			itemId: p2,
			label: 'P2',
			field: 'notes',
			mine: 'from the tablet',
			theirs: 'from the laptop',
			by: 'Esme Ward'
		});
		watch.destroy();
	});

	test('a value that won, a field nobody else touched, and a later edit on top of it give no notice', () => {
		const { server, p2 } = serverBoard();
		const tablet = copyOf(server);
		const notices: OverwriteNotice[] = [];
		const remote = Symbol('server');
		const watch = new OverwriteWatch(
			tablet,
			(o) => o === remote,
			(n) => notices.push(n)
		);
		updatePoint(tablet, p2, { component: 'motor NDE' });
		const laptop = copyOf(server);
		updatePoint(laptop, p2, { notes: 'other field' });
		Y.applyUpdate(tablet, Y.encodeStateAsUpdate(laptop, Y.encodeStateVector(tablet)), remote);
		expect(notices).toEqual([]);
		// A later edit by someone who had the person's value is no conflict, whichever client id is higher.
		updatePoint(tablet, p2, { component: 'online edit' });
		laptop.clientID = tablet.clientID - 1;
		Y.applyUpdate(laptop, Y.encodeStateAsUpdate(tablet, Y.encodeStateVector(laptop)));
		updatePoint(laptop, p2, { component: 'later edit' });
		Y.applyUpdate(tablet, Y.encodeStateAsUpdate(laptop, Y.encodeStateVector(tablet)), remote);
		expect(readBoard(tablet).points.find((p) => p.id === p2)!.component).toBe('later edit');
		expect(notices).toEqual([]);
		expect(watch.watching).toBe(0);
		watch.destroy();
	});

	test('both orders of a concurrent write: exactly the loser is told', () => {
		for (const tabletHigher of [false, true]) {
			const { server, p2 } = serverBoard();
			const tablet = copyOf(server);
			const laptop = copyOf(server);
			tablet.clientID = 1000;
			laptop.clientID = tabletHigher ? 999 : 1001;
			const notices: OverwriteNotice[] = [];
			const remote = Symbol('server');
			const watch = new OverwriteWatch(
				tablet,
				(o) => o === remote,
				(n) => notices.push(n)
			);
			updatePoint(tablet, p2, { flatDiameterMm: 35 });
			updatePoint(laptop, p2, { flatDiameterMm: 28 });
			Y.applyUpdate(tablet, Y.encodeStateAsUpdate(laptop, Y.encodeStateVector(tablet)), remote);
			// Yjs keeps the concurrent map write of the higher client id.
			const value = readBoard(tablet).points.find((p) => p.id === p2)!.flatDiameterMm;
			expect(value).toBe(tabletHigher ? 35 : 28);
			expect(notices.map((n) => [n.mine, n.theirs])).toEqual(tabletHigher ? [] : [[35, 28]]);
			watch.destroy();
		}
	});
});
