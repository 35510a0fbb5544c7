import { expect, test } from 'vitest';
import { BoardViewState } from '../../../src/lib/board/state.svelte';
import { fit } from '../../../src/lib/board/viewport';

test('the photo is refitted as the view settles, until the person zooms or pans', () => {
	const v = new BoardViewState();
	v.setImage(1200, 800);
	v.resize(1280, 700);
	v.resize(820, 450); // the side panel took its place
	expect(v.viewport).toEqual(fit(1200, 800, 820, 450));
	v.pan(10, 0);
	v.resize(800, 450);
	expect(v.viewport.x).toBeCloseTo(fit(1200, 800, 820, 450).x + 10, 9);
	v.fit();
	expect(v.viewport).toEqual(fit(1200, 800, 800, 450));
	expect(v.snapRadius).toBeCloseTo(22 / v.viewport.scale, 9);
});

test('centring brings an image point to the middle of the view', () => {
	const v = new BoardViewState();
	v.setImage(1000, 1000);
	v.resize(500, 500);
	v.zoom(2);
	v.centreOn([100, 900]);
	const [sx, sy] = v.toScreen([100, 900]);
	expect(sx).toBeCloseTo(250, 9);
	expect(sy).toBeCloseTo(250, 9);
});
