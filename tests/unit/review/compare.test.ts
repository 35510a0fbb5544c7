// Comparing two revisions: a known pair gives the known list.
import { describe, expect, it } from 'vitest';
import { compareRevisions, mmPerPx, polylineShift, type ComparableRevision } from '../../../src/lib/survey/compare';

const point = (id: string, label: string, x: number, y: number, extra: Record<string, unknown> = {}) => ({
	boardId: 'b1',
	id,
	label,
	x,
	y,
	fields: { label, x, y, createdAt: 1, surface: 'machined_housing', status: 'approved', flatDiameterMm: 40, ...extra }
});
const route = (id: string, pointId: string, vertices: Array<[number, number]>, extra: Record<string, unknown> = {}) => ({
	boardId: 'b1',
	id,
	pointId,
	vertices,
	fields: { pointId, vertices, createdAt: 1, crossSectionMm2: 0.75, ...extra }
});

// Scale: 520 px on the photo are 800 mm (the demo sketch's reference line).
const scale = { a: [900, 800] as [number, number], b: [1420, 800] as [number, number], lengthMm: 800 };

const r1: ComparableRevision = {
	number: 1,
	boards: [{ boardId: 'b1', title: 'Pump drive side', scale }],
	points: [
		point('p1', 'P1', 610, 560),
		point('p2', 'P2', 850, 610, { surface: 'sheet_cover', status: 'flagged' }),
		point('p3', 'P3', 960, 520)
	],
	routes: [
		route('r1', 'p1', [
			[610, 560],
			[610, 400],
			[1500, 400]
		]),
		route('r3', 'p3', [
			[960, 520],
			[730, 600]
		])
	]
};
const r2: ComparableRevision = {
	number: 2,
	boards: [{ boardId: 'b1', title: 'Pump drive side', scale }],
	points: [
		point('p1', 'P1', 610, 560),
		// P2 moved 30 px right and 40 px down (50 px) onto the bearing housing and approved.
		point('p2', 'P2', 880, 650, { surface: 'machined_housing', status: 'approved' }),
		point('p4', 'P4', 1000, 500)
	],
	routes: [
		route(
			'r1',
			'p1',
			[
				[610, 560],
				[610, 400],
				[1500, 400]
			],
			{ crossSectionMm2: 1.5 }
		),
		route('r4', 'p4', [
			[1000, 500],
			[1000, 900]
		])
	]
};

describe('compareRevisions', () => {
	it('lists added, removed, moved and changed points and routes', () => {
		const d = compareRevisions(r1, r2);
		expect(d.from).toBe(1);
		expect(d.to).toBe(2);
		expect(d.points.added.map((x) => x.label)).toEqual(['P4']);
		expect(d.points.removed.map((x) => x.label)).toEqual(['P3']);
		// 50 px × 800 mm / 520 px = 76.9 mm
		expect(d.points.moved).toEqual([
			{ item: { boardId: 'b1', boardTitle: 'Pump drive side', id: 'p2', label: 'P2' }, distancePx: 50, distanceMm: 76.9 }
		]);
		expect(d.points.changed).toEqual([
			{
				item: { boardId: 'b1', boardTitle: 'Pump drive side', id: 'p2', label: 'P2' },
				changes: [
					{ field: 'status', before: 'flagged', after: 'approved' },
					{ field: 'surface', before: 'sheet_cover', after: 'machined_housing' }
				]
			}
		]);
		expect(d.routes.added.map((x) => [x.id, x.label])).toEqual([['r4', 'P4']]);
		expect(d.routes.removed.map((x) => [x.id, x.label])).toEqual([['r3', 'P3']]);
		expect(d.routes.moved).toEqual([]);
		expect(d.routes.changed).toEqual([
			{
				item: { boardId: 'b1', boardTitle: 'Pump drive side', id: 'r1', label: 'P1' },
				changes: [{ field: 'crossSectionMm2', before: 0.75, after: 1.5 }]
			}
		]);
	});

	it('a redrawn route counts as moved by its largest shift; without a scale there are no mm', () => {
		const a: ComparableRevision = {
			number: 1,
			boards: [{ boardId: 'b1', title: 'B', scale: null }],
			points: [point('p1', 'P1', 0, 0)],
			routes: [
				route('r1', 'p1', [
					[0, 0],
					[100, 0]
				])
			]
		};
		const b: ComparableRevision = {
			...a,
			number: 2,
			routes: [
				route('r1', 'p1', [
					[0, 0],
					[100, 20]
				])
			]
		};
		const d = compareRevisions(a, b);
		expect(d.routes.moved).toEqual([{ item: { boardId: 'b1', boardTitle: 'B', id: 'r1', label: 'P1' }, distancePx: 20, distanceMm: null }]);
		expect(d.routes.changed).toEqual([]);
		expect(compareRevisions(a, a).points).toEqual({ added: [], removed: [], moved: [], changed: [] });
	});

	it('geometry helpers', () => {
		expect(mmPerPx(scale)).toBeCloseTo(800 / 520, 9);
		expect(mmPerPx(null)).toBeNull();
		expect(
			polylineShift(
				[
					[0, 0],
					[10, 0]
				],
				[
					[0, 0],
					[10, 0]
				]
			)
		).toBe(0);
		expect(polylineShift([[0, 0]], [[3, 4]])).toBe(5);
	});
});
