import { describe, expect, test } from 'vitest';
import {
	clampScale,
	fit,
	MAX_SCALE,
	MIN_SCALE,
	panBy,
	pinch,
	toImage,
	toScreen,
	wheelFactor,
	zoomAt
} from '../../../src/lib/board/viewport';

describe('viewport', () => {
	test('screen and image coordinates are inverse', () => {
		const v = { x: 40, y: -20, scale: 2.5 };
		expect(toImage(v, toScreen(v, [123, 456]))).toEqual([123, 456]);
		expect(toScreen(v, [10, 10])).toEqual([65, 5]);
	});

	test('zooming keeps the image point under the cursor in place', () => {
		const v = { x: 10, y: 20, scale: 1 };
		const anchor: [number, number] = [300, 200];
		const before = toImage(v, anchor);
		const z = zoomAt(v, anchor, 2);
		expect(z.scale).toBe(2);
		const after = toImage(z, anchor);
		expect(after[0]).toBeCloseTo(before[0], 9);
		expect(after[1]).toBeCloseTo(before[1], 9);
	});

	test('zoom is clamped and bad factors do not break the view', () => {
		expect(zoomAt({ x: 0, y: 0, scale: 10 }, [0, 0], 100).scale).toBe(MAX_SCALE);
		expect(zoomAt({ x: 0, y: 0, scale: 0.1 }, [0, 0], 0.001).scale).toBe(MIN_SCALE);
		expect(clampScale(Number.NaN)).toBe(1);
	});

	test('fit centres the whole image with a margin', () => {
		const v = fit(4000, 3000, 820, 600, 10);
		expect(v.scale).toBeCloseTo(580 / 3000, 9); // height limits: (600 − 20) / 3000
		expect(v.y).toBeCloseTo(10, 9);
		expect(v.x).toBeCloseTo((820 - 4000 * v.scale) / 2, 9);
		expect(fit(0, 0, 800, 600)).toEqual({ x: 0, y: 0, scale: 1 });
	});

	test('pinch: spreading fingers zooms about their midpoint and moving them pans', () => {
		const v = { x: 0, y: 0, scale: 1 };
		const z = pinch(
			v,
			[
				[100, 100],
				[200, 100]
			],
			[
				[50, 100],
				[250, 100]
			]
		);
		expect(z.scale).toBe(2);
		expect(toImage(z, [150, 100])).toEqual([150, 100]);
		const p = pinch(
			v,
			[
				[100, 100],
				[200, 100]
			],
			[
				[130, 140],
				[230, 140]
			]
		);
		expect(p).toEqual({ x: 30, y: 40, scale: 1 });
		expect(panBy(v, 5, -5)).toEqual({ x: 5, y: -5, scale: 1 });
	});

	test('wheel up zooms in, wheel down zooms out, by the same ratio', () => {
		expect(wheelFactor(-100)).toBeGreaterThan(1);
		expect(wheelFactor(100)).toBeLessThan(1);
		expect(wheelFactor(-100) * wheelFactor(100)).toBeCloseTo(1, 12);
		expect(wheelFactor(-3, 1)).toBeCloseTo(wheelFactor(-48), 12);
	});
});
