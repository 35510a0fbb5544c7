import { expect, test } from 'vitest';
import * as Y from 'yjs';
import { addPoint, addRoute, addZone, readBoard } from '../../../src/lib/board/model';
import { hitTest } from '../../../src/lib/board/hit';

function setup() {
	const doc = new Y.Doc();
	const outer = addZone(doc, {
		polygon: [
			[0, 0],
			[400, 0],
			[400, 400],
			[0, 400]
		]
	});
	const inner = addZone(doc, {
		polygon: [
			[100, 100],
			[200, 100],
			[200, 200],
			[100, 200]
		]
	});
	const p1 = addPoint(doc, { x: 150, y: 150 });
	const p2 = addPoint(doc, { x: 170, y: 150 });
	const r = addRoute(doc, {
		pointId: p1,
		vertices: [
			[150, 150],
			[150, 300],
			[350, 300]
		]
	});
	return { board: readBoard(doc), outer, inner, p1, p2, r };
}

test('the nearest point wins within a fingertip', () => {
	const { board, p1, p2 } = setup();
	expect(hitTest(board, [], [158, 150], 22)).toEqual({ kind: 'point', id: p1 });
	expect(hitTest(board, [], [163, 150], 22)).toEqual({ kind: 'point', id: p2 });
});

test('route lines, then the smallest zone under the finger', () => {
	const { board, r, inner, outer } = setup();
	expect(hitTest(board, [], [250, 305], 22)).toEqual({ kind: 'route', id: r });
	expect(hitTest(board, [], [190, 110], 22)).toEqual({ kind: 'zone', id: inner });
	expect(hitTest(board, [], [30, 30], 22)).toEqual({ kind: 'zone', id: outer });
	expect(hitTest(board, [], [900, 900], 22)).toBeNull();
});

test('corner handles only on the selected route or zone, never the route’s first corner', () => {
	const { board, r, inner, p1 } = setup();
	expect(hitTest(board, [], [350, 300], 22)).toEqual({ kind: 'route', id: r });
	expect(hitTest(board, [r], [352, 298], 22)).toEqual({ kind: 'vertex', owner: 'route', id: r, index: 2 });
	expect(hitTest(board, [r], [150, 150], 22)).toEqual({ kind: 'point', id: p1 });
	expect(hitTest(board, [inner], [101, 199], 22)).toEqual({ kind: 'vertex', owner: 'zone', id: inner, index: 3 });
});
