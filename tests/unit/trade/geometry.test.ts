import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import {
	keepOutZonesCrossed,
	metresPerUnit,
	pointInPolygon,
	polygonArea,
	polylineCrossesPolygon,
	polylineLength,
	polylineLengthM,
	segmentsIntersect,
	type Vec2
} from '../../../src/lib/trade';

const square: Vec2[] = [
	[0, 0],
	[10, 0],
	[10, 10],
	[0, 10]
];

// A U-shaped zone: the notch between the arms runs from x = 4 to x = 6, y = 4 to 10.
const uShape: Vec2[] = [
	[0, 0],
	[10, 0],
	[10, 10],
	[6, 10],
	[6, 4],
	[4, 4],
	[4, 10],
	[0, 10]
];

describe('polylineLength', () => {
	test('3-4-5 triangle sides', () => {
		expect(
			polylineLength([
				[0, 0],
				[3, 4]
			])
		).toBe(5);
		expect(
			polylineLength([
				[0, 0],
				[3, 4],
				[3, 0]
			])
		).toBe(9);
	});
	test('empty and single-point polylines have no length', () => {
		expect(polylineLength([])).toBe(0);
		expect(polylineLength([[4, 4]])).toBe(0);
	});
	test('zero-length segments add nothing', () => {
		expect(
			polylineLength([
				[1, 1],
				[1, 1],
				[4, 5]
			])
		).toBe(5);
	});
});

describe('polylineCrossesPolygon', () => {
	test('crossing straight through', () => {
		expect(
			polylineCrossesPolygon(
				[
					[-5, 5],
					[15, 5]
				],
				square
			)
		).toBe(true);
	});
	test('entering and ending inside', () => {
		expect(
			polylineCrossesPolygon(
				[
					[-5, 5],
					[5, 5]
				],
				square
			)
		).toBe(true);
	});
	test('touching: a route vertex on an edge', () => {
		expect(
			polylineCrossesPolygon(
				[
					[20, 0],
					[10, 5],
					[20, 10]
				],
				square
			)
		).toBe(true);
		expect(
			polylineCrossesPolygon(
				[
					[20, 5],
					[10, 5]
				],
				square
			)
		).toBe(true);
	});
	test('touching: passing through a corner only', () => {
		expect(
			polylineCrossesPolygon(
				[
					[-5, 5],
					[5, -5]
				],
				square
			)
		).toBe(true);
	});
	test('touching: a zone corner on a route segment', () => {
		// The route runs along y = x − 5; the zone's corner (10, 5) lies on it, the other corners below it.
		const zone: Vec2[] = [
			[10, 5],
			[14, 3],
			[16, 6],
			[13, 7]
		];
		expect(
			polylineCrossesPolygon(
				[
					[0, -5],
					[20, 15]
				],
				zone
			)
		).toBe(true);
		expect(
			polylineCrossesPolygon(
				[
					[0, -4],
					[20, 16]
				],
				zone
			)
		).toBe(false); // one unit higher: clear
	});
	test('collinear overlap along an edge', () => {
		expect(
			polylineCrossesPolygon(
				[
					[-5, 0],
					[5, 0]
				],
				square
			)
		).toBe(true);
		expect(
			polylineCrossesPolygon(
				[
					[2, 10],
					[8, 10]
				],
				square
			)
		).toBe(true);
		expect(
			polylineCrossesPolygon(
				[
					[-5, 10],
					[15, 10]
				],
				square
			)
		).toBe(true);
	});
	test('collinear with an edge but beyond its end is clear', () => {
		expect(
			polylineCrossesPolygon(
				[
					[12, 0],
					[20, 0]
				],
				square
			)
		).toBe(false);
	});
	test('fully inside counts', () => {
		expect(
			polylineCrossesPolygon(
				[
					[2, 2],
					[8, 8],
					[3, 7]
				],
				square
			)
		).toBe(true);
	});
	test('near misses are clear', () => {
		expect(
			polylineCrossesPolygon(
				[
					[-5, 10.000001],
					[15, 10.000001]
				],
				square
			)
		).toBe(false);
		expect(
			polylineCrossesPolygon(
				[
					[10.5, -5],
					[10.5, 15]
				],
				square
			)
		).toBe(false);
	});
	test('a route that goes round the zone without touching is clear', () => {
		expect(
			polylineCrossesPolygon(
				[
					[-1, -1],
					[11, -1],
					[11, 11],
					[-1, 11],
					[-1, -1]
				],
				square
			)
		).toBe(false);
	});
	test('a route through the notch of a concave zone is clear; cutting across an arm is not', () => {
		expect(
			polylineCrossesPolygon(
				[
					[5, 20],
					[5, 5]
				],
				uShape
			)
		).toBe(false);
		expect(
			polylineCrossesPolygon(
				[
					[5, 20],
					[5, 3]
				],
				uShape
			)
		).toBe(true);
		expect(
			polylineCrossesPolygon(
				[
					[5, 5],
					[5, 4]
				],
				uShape
			)
		).toBe(true); // ends on the notch floor
	});
	test('an explicitly closed polygon behaves the same', () => {
		const closed: Vec2[] = [...square, [0, 0]];
		expect(
			polylineCrossesPolygon(
				[
					[-5, 5],
					[15, 5]
				],
				closed
			)
		).toBe(true);
		expect(
			polylineCrossesPolygon(
				[
					[10.5, -5],
					[10.5, 15]
				],
				closed
			)
		).toBe(false);
	});

	describe('degenerate inputs', () => {
		test('an empty route crosses nothing', () => {
			expect(polylineCrossesPolygon([], square)).toBe(false);
		});
		test('a single point counts when inside or on the edge', () => {
			expect(polylineCrossesPolygon([[5, 5]], square)).toBe(true);
			expect(polylineCrossesPolygon([[10, 5]], square)).toBe(true);
			expect(polylineCrossesPolygon([[0, 0]], square)).toBe(true);
			expect(polylineCrossesPolygon([[15, 5]], square)).toBe(false);
		});
		test('a zero-length segment behaves as a point', () => {
			expect(
				polylineCrossesPolygon(
					[
						[5, 5],
						[5, 5]
					],
					square
				)
			).toBe(true);
			expect(
				polylineCrossesPolygon(
					[
						[10, 3],
						[10, 3]
					],
					square
				)
			).toBe(true);
			expect(
				polylineCrossesPolygon(
					[
						[20, 20],
						[20, 20]
					],
					square
				)
			).toBe(false);
		});
		test('a zone with fewer than three corners encloses nothing', () => {
			expect(
				polylineCrossesPolygon(
					[
						[-5, 5],
						[15, 5]
					],
					[]
				)
			).toBe(false);
			expect(
				polylineCrossesPolygon(
					[
						[-5, 5],
						[15, 5]
					],
					[[5, 5]]
				)
			).toBe(false);
			expect(
				polylineCrossesPolygon(
					[
						[-5, 5],
						[15, 5]
					],
					[
						[5, 0],
						[5, 10]
					]
				)
			).toBe(false);
		});
		test('non-numbers are refused with the field named', () => {
			expect(() => polylineCrossesPolygon([[0, Number.NaN]], square)).toThrow(/points\[0\]\[1\]/);
			expect(() =>
				polylineCrossesPolygon(
					[[0, 0]],
					[
						[0, 0],
						[1, Infinity],
						[2, 0]
					]
				)
			).toThrow(/polygon\[1\]\[1\]/);
			expect(() => polylineCrossesPolygon('x' as unknown as Vec2[], square)).toThrow(RangeError);
			expect(() => polylineLength([[1, 2, 3] as unknown as Vec2])).toThrow(/points\[0\]/);
		});
	});
});

describe('segmentsIntersect', () => {
	test('proper crossing, shared end, parallel, collinear apart', () => {
		expect(segmentsIntersect([0, 0], [4, 4], [0, 4], [4, 0])).toBe(true);
		expect(segmentsIntersect([0, 0], [2, 2], [2, 2], [5, 0])).toBe(true);
		expect(segmentsIntersect([0, 0], [4, 0], [0, 1], [4, 1])).toBe(false);
		expect(segmentsIntersect([0, 0], [1, 0], [2, 0], [3, 0])).toBe(false);
		expect(segmentsIntersect([0, 0], [2, 0], [1, 0], [3, 0])).toBe(true);
	});
});

describe('pointInPolygon, polygonArea, keep-out list', () => {
	test('inside, on the boundary, outside', () => {
		expect(pointInPolygon([5, 5], square)).toBe(true);
		expect(pointInPolygon([0, 5], square)).toBe(true);
		expect(pointInPolygon([5, 7], uShape)).toBe(false);
		expect(pointInPolygon([-1, 5], square)).toBe(false);
	});
	test('area by the shoelace formula', () => {
		expect(polygonArea(square)).toBe(100);
		expect(polygonArea(uShape)).toBe(100 - 2 * 6);
		expect(
			polygonArea([
				[0, 0],
				[1, 1]
			])
		).toBe(0);
	});
	test('lists the zones a route touches', () => {
		const far: Vec2[] = [
			[100, 100],
			[110, 100],
			[110, 110]
		];
		expect(
			keepOutZonesCrossed(
				[
					[-5, 5],
					[15, 5]
				],
				[far, square]
			)
		).toEqual([1]);
	});
});

describe('scale calibration', () => {
	test('a 200-unit line known to be 0.5 m gives 2.5 mm per unit', () => {
		const s = metresPerUnit([100, 100], [300, 100], 0.5);
		expect(s).toBeCloseTo(0.0025, 15);
		expect(
			polylineLengthM(
				[
					[0, 0],
					[300, 400]
				],
				s
			)
		).toBeCloseTo(1.25, 12);
	});
	test('a zero-length reference or a non-positive length is refused', () => {
		expect(() => metresPerUnit([1, 1], [1, 1], 1)).toThrow(RangeError);
		expect(() => metresPerUnit([0, 0], [1, 1], 0)).toThrow(/realLengthM/);
	});
});

describe('properties', () => {
	// Integer coordinates keep the arithmetic exact, so the properties hold without tolerance.
	const coord = fc.integer({ min: -100, max: 100 });
	const pt = fc.tuple(coord, coord) as fc.Arbitrary<Vec2>;
	const polyline = fc.array(pt, { minLength: 0, maxLength: 8 });
	const polygon = fc.array(pt, { minLength: 3, maxLength: 8 });
	const shift = fc.tuple(fc.integer({ min: -1000, max: 1000 }), fc.integer({ min: -1000, max: 1000 }));
	const move = (ps: Vec2[], [dx, dy]: [number, number]): Vec2[] => ps.map(([x, y]) => [x + dx, y + dy]);

	test('translation changes neither length nor crossing', () => {
		fc.assert(
			fc.property(polyline, polygon, shift, (line, zone, d) => {
				expect(polylineLength(move(line, d))).toBeCloseTo(polylineLength(line), 9);
				expect(polylineCrossesPolygon(move(line, d), move(zone, d))).toBe(polylineCrossesPolygon(line, zone));
			}),
			{ numRuns: 500 }
		);
	});

	test('reversing the route changes neither length nor crossing', () => {
		fc.assert(
			fc.property(polyline, polygon, (line, zone) => {
				const back = [...line].reverse();
				expect(polylineLength(back)).toBeCloseTo(polylineLength(line), 9);
				expect(polylineCrossesPolygon(back, zone)).toBe(polylineCrossesPolygon(line, zone));
			}),
			{ numRuns: 500 }
		);
	});

	test('the zone outline direction and starting corner do not matter', () => {
		fc.assert(
			fc.property(polyline, polygon, fc.nat(), (line, zone, k) => {
				const start = k % zone.length;
				const rotated = [...zone.slice(start), ...zone.slice(0, start)];
				const expected = polylineCrossesPolygon(line, zone);
				expect(polylineCrossesPolygon(line, rotated)).toBe(expected);
				expect(polylineCrossesPolygon(line, [...zone].reverse())).toBe(expected);
			}),
			{ numRuns: 500 }
		);
	});

	test('a route with a vertex inside the square always counts', () => {
		const inside = fc.tuple(fc.integer({ min: 1, max: 9 }), fc.integer({ min: 1, max: 9 })) as fc.Arbitrary<Vec2>;
		fc.assert(
			fc.property(polyline, inside, fc.nat(), (line, p, k) => {
				const at = line.length === 0 ? 0 : k % (line.length + 1);
				const withInside = [...line.slice(0, at), p, ...line.slice(at)];
				expect(polylineCrossesPolygon(withInside, square)).toBe(true);
			})
		);
	});
});
