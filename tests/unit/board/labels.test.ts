// Label placement on the canvas: no two placed labels overlap, a point's label never covers a
// keep-out zone's label or another marker, labels that find no room are left out, and the
// selection's label is always shown.
import { describe, expect, test } from 'vitest';
import { placeLabels, type LabelRequest } from '../../../src/lib/board/render/labels';

const box = (p: { left: number; top: number }, r: LabelRequest) => ({ l: p.left, t: p.top, r: p.left + r.w, b: p.top + r.h });
const overlap = (a: ReturnType<typeof box>, b: ReturnType<typeof box>) => a.l < b.r && a.r > b.l && a.t < b.b && a.b > b.t;

describe('label placement', () => {
	test('a point label next to a keep-out label moves aside instead of covering it', () => {
		const zone: LabelRequest = { id: 'z', x: 100, y: 100, w: 160, h: 22, r: 0, priority: 1000, always: true, fixed: { dx: 0, dy: -26 } };
		// The point sits just under the zone's label: its usual spot (to the right) would cover it.
		const point: LabelRequest = { id: 'p', x: 110, y: 86, w: 120, h: 22, r: 15, priority: 300 };
		const placed = placeLabels([point, zone]);
		const z = placed.find((p) => p.id === 'z')!;
		const p = placed.find((x) => x.id === 'p')!;
		expect(z).toMatchObject({ left: 100, top: 74 });
		expect(p).toBeDefined();
		expect(overlap(box(p, point), box(z, zone))).toBe(false);
	});

	test('many labels in a crowd: none overlaps another or a marker; those without room are left out', () => {
		const requests: LabelRequest[] = [];
		const markers: Array<{ x: number; y: number; r: number }> = [];
		for (let i = 0; i < 200; i++) {
			const x = (i % 20) * 30;
			const y = Math.floor(i / 20) * 30;
			markers.push({ x, y, r: 12 });
			requests.push({ id: `p${i}`, x, y, w: 90, h: 20, r: 15, priority: i % 3 });
		}
		const placed = placeLabels(requests, markers);
		expect(placed.length).toBeGreaterThan(0);
		expect(placed.length).toBeLessThan(requests.length);
		const boxes = placed.map((p) =>
			box(
				p,
				requests.find((r) => r.id === p.id)!
			)
		);
		for (let i = 0; i < boxes.length; i++) {
			for (let j = i + 1; j < boxes.length; j++) expect(overlap(boxes[i], boxes[j])).toBe(false);
			for (const m of markers) expect(overlap(boxes[i], { l: m.x - m.r, t: m.y - m.r, r: m.x + m.r, b: m.y + m.r })).toBe(false);
		}
	});

	test('a label placed away from its marker gets a leader line from the marker’s rim', () => {
		// Labels already fill the four near spots around the point.
		const blockers: LabelRequest[] = [
			{ id: 'right', x: 219, y: 100, w: 60, h: 20, r: 0, priority: 900, fixed: { dx: 0, dy: -10 } },
			{ id: 'left', x: 81, y: 100, w: 60, h: 20, r: 0, priority: 900, fixed: { dx: -60, dy: -10 } },
			{ id: 'above', x: 150, y: 81, w: 60, h: 20, r: 0, priority: 900, fixed: { dx: -30, dy: -20 } },
			{ id: 'below', x: 150, y: 119, w: 60, h: 20, r: 0, priority: 900, fixed: { dx: -30, dy: 0 } }
		];
		const point: LabelRequest = { id: 'p', x: 150, y: 100, w: 60, h: 20, r: 15, priority: 100 };
		const p = placeLabels([...blockers, point]).find((x) => x.id === 'p')!;
		expect(p.leader).not.toBeNull();
		const [x1, y1] = p.leader!;
		expect(Math.hypot(x1 - 150, y1 - 100)).toBeCloseTo(15, 5);
	});

	test('the selected point’s label shows even where there is no free spot', () => {
		const wall: LabelRequest = { id: 'w', x: 0, y: 0, w: 1000, h: 1000, r: 0, priority: 1000, always: true, fixed: { dx: 0, dy: 0 } };
		const sel: LabelRequest = { id: 's', x: 500, y: 500, w: 80, h: 20, r: 15, priority: 900, always: true };
		const other: LabelRequest = { id: 'o', x: 400, y: 400, w: 80, h: 20, r: 15, priority: 300 };
		expect(placeLabels([wall, sel, other]).map((p) => p.id)).toEqual(['w', 's']);
	});
});
