import { describe, expect, test } from 'vitest';
import * as Y from 'yjs';
import { addPoint, addRoute, addZone, readBoard } from '../../../src/lib/board/model';
import { createTool, type HitTarget, type Tool, type ToolHost, type ToolPointer } from '../../../src/lib/board/tools';
import type { ScaleTool, MeasureTool } from '../../../src/lib/board/tools';

/** A host at zoom 1 (image = screen) that records what the tool asked for. */
function host(opts: { canEdit?: boolean } = {}) {
	const doc = new Y.Doc();
	let selection: string[] = [];
	const said: string[] = [];
	const pans: Array<[number, number]> = [];
	const h: ToolHost = {
		doc,
		board: () => readBoard(doc),
		selection: () => selection,
		select: (ids) => (selection = ids),
		panBy: (dx, dy) => pans.push([dx, dy]),
		snapRadius: () => 22,
		userName: 'Tam Tech',
		canEdit: () => opts.canEdit ?? true,
		say: (m) => said.push(m)
	};
	return { h, doc, said, pans, sel: () => selection };
}

const at = (x: number, y: number, target: HitTarget = null): ToolPointer => ({ x, y, sx: x, sy: y, target });

function tap(tool: Tool, x: number, y: number, target: HitTarget = null) {
	tool.down(at(x, y, target));
	tool.up(at(x + 2, y + 1, target)); // a finger wanders a little
}

function drag(tool: Tool, from: [number, number], to: [number, number], target: HitTarget = null) {
	tool.down(at(from[0], from[1], target));
	tool.move(at((from[0] + to[0]) / 2, (from[1] + to[1]) / 2));
	tool.move(at(to[0], to[1]));
	tool.up(at(to[0], to[1]));
}

describe('point tool', () => {
	test('a tap places a point with the user’s name and selects it; a drag pans instead', () => {
		const { h, doc, pans, sel } = host();
		const tool = createTool('point', h);
		tap(tool, 100, 50);
		const [p] = readBoard(doc).points;
		expect(p).toMatchObject({ x: 100, y: 50, label: 'P1', createdBy: 'Tam Tech' });
		expect(sel()).toEqual([p.id]);
		drag(tool, [10, 10], [60, 40]);
		expect(readBoard(doc).points).toHaveLength(1);
		expect(pans.reduce((s, [dx, dy]) => [s[0] + dx, s[1] + dy], [0, 0])).toEqual([50, 30]);
	});

	test('tapping an existing point opens it rather than stacking another', () => {
		const { h, doc, sel } = host();
		const id = addPoint(doc, { x: 5, y: 5 });
		tap(createTool('point', h), 5, 5, { kind: 'point', id });
		expect(readBoard(doc).points).toHaveLength(1);
		expect(sel()).toEqual([id]);
	});

	test('a read-only user cannot place points and is told why', () => {
		const { h, doc, said } = host({ canEdit: false });
		tap(createTool('point', h), 5, 5);
		expect(readBoard(doc).points).toHaveLength(0);
		expect(said[0]).toMatch(/read-only/);
	});
});

describe('select tool', () => {
	test('tap selects, tap on nothing clears, drag moves a point in one step', () => {
		const { h, doc, sel } = host();
		const id = addPoint(doc, { x: 10, y: 10 });
		const tool = createTool('select', h);
		tap(tool, 10, 10, { kind: 'point', id });
		expect(sel()).toEqual([id]);
		tap(tool, 300, 300);
		expect(sel()).toEqual([]);
		tool.down(at(10, 10, { kind: 'point', id }));
		tool.move(at(40, 30));
		expect(tool.draft()).toEqual({ kind: 'move', id, x: 40, y: 30 });
		expect(readBoard(doc).points[0]).toMatchObject({ x: 10, y: 10 }); // nothing written mid-drag
		tool.up(at(70, 90));
		expect(readBoard(doc).points[0]).toMatchObject({ x: 70, y: 90 });
		expect(tool.draft()).toBeNull();
	});

	test('dragging a zone corner reshapes it; a route’s first corner stays with its point', () => {
		const { h, doc, pans } = host();
		const z = addZone(doc, {
			polygon: [
				[0, 0],
				[100, 0],
				[100, 100]
			]
		});
		const p = addPoint(doc, { x: 0, y: 0 });
		const r = addRoute(doc, {
			pointId: p,
			vertices: [
				[0, 0],
				[50, 50]
			]
		});
		const tool = createTool('select', h);
		drag(tool, [100, 100], [150, 120], { kind: 'vertex', owner: 'zone', id: z, index: 2 });
		expect(readBoard(doc).zones[0].polygon[2]).toEqual([150, 120]);
		drag(tool, [0, 0], [30, 30], { kind: 'vertex', owner: 'route', id: r, index: 0 });
		expect(readBoard(doc).routes[0].vertices[0]).toEqual([0, 0]);
		expect(pans.length).toBeGreaterThan(0);
	});

	test('Delete removes the selection; a viewer cannot', () => {
		const { h, doc, sel } = host();
		const id = addPoint(doc, { x: 1, y: 1 });
		h.select([id]);
		expect(createTool('select', h).key('Delete')).toBe(true);
		expect(readBoard(doc).points).toHaveLength(0);
		expect(sel()).toEqual([]);

		const v = host({ canEdit: false });
		const keep = addPoint(v.doc, { x: 1, y: 1 });
		v.h.select([keep]);
		createTool('select', v.h).key('Delete');
		expect(readBoard(v.doc).points).toHaveLength(1);
		expect(v.said[0]).toMatch(/read-only/);
	});
});

describe('route tool', () => {
	test('must start on a point; taps add bends; tapping the last bend again finishes', () => {
		const { h, doc, said, sel } = host();
		const p = addPoint(doc, { x: 10, y: 10 });
		const tool = createTool('route', h);
		tap(tool, 200, 200);
		expect(said.at(-1)).toMatch(/Start the cable route on a measurement point/);
		expect(tool.draft()).toBeNull();
		tap(tool, 12, 11, { kind: 'point', id: p });
		expect(tool.canFinish()).toBe(false);
		tap(tool, 100, 10);
		tap(tool, 100, 200);
		expect(tool.draft()).toMatchObject({
			kind: 'polyline',
			points: [
				[10, 10],
				[100, 10],
				[100, 200]
			]
		});
		tap(tool, 105, 203); // within the snap radius of the last bend
		const [route] = readBoard(doc).routes;
		expect(route).toMatchObject({
			pointId: p,
			vertices: [
				[10, 10],
				[100, 10],
				[100, 200]
			]
		});
		expect(sel()).toEqual([route.id]);
		expect(tool.draft()).toBeNull();
	});

	test('Backspace takes back a bend, Escape drops the route, Enter finishes', () => {
		const { h, doc } = host();
		const p = addPoint(doc, { x: 0, y: 0 });
		const tool = createTool('route', h);
		tap(tool, 0, 0, { kind: 'point', id: p });
		tap(tool, 50, 0);
		tap(tool, 90, 0);
		tool.key('Backspace');
		expect(tool.draft()).toMatchObject({
			points: [
				[0, 0],
				[50, 0]
			]
		});
		tool.key('Escape');
		expect(tool.draft()).toBeNull();
		tap(tool, 0, 0, { kind: 'point', id: p });
		tap(tool, 0, 80);
		expect(tool.key('Enter')).toBe(true);
		expect(readBoard(doc).routes[0].vertices).toEqual([
			[0, 0],
			[0, 80]
		]);
	});
});

describe('zone tool', () => {
	test('corners by tap; tapping the first corner closes the zone', () => {
		const { h, doc, sel } = host();
		const tool = createTool('zone', h);
		tap(tool, 0, 0);
		tap(tool, 100, 0);
		expect(tool.canFinish()).toBe(false);
		expect(tool.finish()).toBe(false);
		tap(tool, 100, 100);
		expect(tool.draft()).toMatchObject({ kind: 'polygon', closable: true });
		tap(tool, 3, 4);
		const [z] = readBoard(doc).zones;
		expect(z.polygon).toEqual([
			[0, 0],
			[100, 0],
			[100, 100]
		]);
		expect(z.kind).toBe('other');
		expect(sel()).toEqual([z.id]);
	});
});

describe('scale and measure', () => {
	test('drag a reference line, type its length: the scale is stored', () => {
		const { h, doc } = host();
		const tool = createTool('scale', h) as ScaleTool;
		expect(tool.confirm(100)).toMatch(/Draw the reference line first/);
		drag(tool, [0, 0], [300, 400]);
		expect(tool.draft()).toMatchObject({ kind: 'line', purpose: 'scale', done: true, a: [0, 0], b: [300, 400] });
		expect(tool.confirm(Number.NaN)).toMatch(/Enter the real length/);
		expect(readBoard(doc).scale).toBeNull();
		expect(tool.confirm(250)).toBeNull();
		expect(readBoard(doc).scale).toEqual({ a: [0, 0], b: [300, 400], lengthMm: 250 });
		expect(tool.draft()).toBeNull();
	});

	test('two taps make a line too; a too-short line is refused', () => {
		const { h, said } = host();
		const tool = createTool('measure', h) as MeasureTool;
		tap(tool, 0, 0);
		tool.move(at(20, 0));
		expect(tool.draft()).toMatchObject({ done: false, b: [20, 0] });
		tap(tool, 0, 60);
		expect(tool.line()).toEqual({ a: [0, 0], b: [0, 60] });
		tap(tool, 0, 0);
		tap(tool, 2, 2);
		expect(tool.line()).toBeNull();
		expect(said.at(-1)).toMatch(/too short/);
	});

	test('a viewer can measure but not set the scale', () => {
		const { h, doc } = host({ canEdit: false });
		const m = createTool('measure', h) as MeasureTool;
		drag(m, [0, 0], [0, 100]);
		expect(m.line()).not.toBeNull();
		const s = createTool('scale', h) as ScaleTool;
		drag(s, [0, 0], [0, 100]);
		expect(s.draft()).toBeNull();
		expect(s.confirm(50)).not.toBeNull();
		expect(readBoard(doc).scale).toBeNull();
	});
});

test('a second finger aborts the press without acting on it', () => {
	const { h, doc } = host();
	const tool = createTool('point', h);
	tool.down(at(10, 10));
	tool.abortPress();
	tool.up(at(10, 10));
	expect(readBoard(doc).points).toHaveLength(0);
});
