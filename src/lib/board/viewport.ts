// Pure viewport arithmetic: screen = image × scale + offset. Shared by the wheel, pinch, keys
// and the "fit" button, and unit-tested without a canvas.
import type { Vec2 } from '../trade';

export interface Viewport {
	x: number;
	y: number;
	scale: number;
}

export const MIN_SCALE = 0.05;
export const MAX_SCALE = 16;

export function clampScale(s: number): number {
	if (!Number.isFinite(s) || s <= 0) return 1;
	return Math.min(MAX_SCALE, Math.max(MIN_SCALE, s));
}

export function toImage(v: Viewport, screen: Vec2): Vec2 {
	return [(screen[0] - v.x) / v.scale, (screen[1] - v.y) / v.scale];
}

export function toScreen(v: Viewport, image: Vec2): Vec2 {
	return [image[0] * v.scale + v.x, image[1] * v.scale + v.y];
}

/** Zooms by `factor` keeping the image point under `anchor` (screen) where it is. */
export function zoomAt(v: Viewport, anchor: Vec2, factor: number): Viewport {
	const scale = clampScale(v.scale * factor);
	const [ix, iy] = toImage(v, anchor);
	return { scale, x: anchor[0] - ix * scale, y: anchor[1] - iy * scale };
}

export function panBy(v: Viewport, dx: number, dy: number): Viewport {
	return { ...v, x: v.x + dx, y: v.y + dy };
}

/** The whole image, centred, with a margin. */
export function fit(imageW: number, imageH: number, viewW: number, viewH: number, margin = 16): Viewport {
	if (!(imageW > 0 && imageH > 0 && viewW > 0 && viewH > 0)) return { x: 0, y: 0, scale: 1 };
	const scale = clampScale(Math.min((viewW - 2 * margin) / imageW, (viewH - 2 * margin) / imageH));
	return { scale, x: (viewW - imageW * scale) / 2, y: (viewH - imageH * scale) / 2 };
}

/**
 * Two-finger gesture: the image point under the old midpoint follows the new midpoint, and the
 * scale follows the change in finger spread.
 */
export function pinch(v: Viewport, from: [Vec2, Vec2], to: [Vec2, Vec2]): Viewport {
	const d0 = Math.hypot(from[1][0] - from[0][0], from[1][1] - from[0][1]);
	const d1 = Math.hypot(to[1][0] - to[0][0], to[1][1] - to[0][1]);
	const m0: Vec2 = [(from[0][0] + from[1][0]) / 2, (from[0][1] + from[1][1]) / 2];
	const m1: Vec2 = [(to[0][0] + to[1][0]) / 2, (to[0][1] + to[1][1]) / 2];
	const scale = clampScale(d0 > 0 ? v.scale * (d1 / d0) : v.scale);
	const [ix, iy] = toImage(v, m0);
	return { scale, x: m1[0] - ix * scale, y: m1[1] - iy * scale };
}

/** Wheel delta to a zoom factor; trackpads send small deltas, mice large ones. */
export function wheelFactor(deltaY: number, deltaMode = 0): number {
	const px = deltaMode === 1 ? deltaY * 16 : deltaMode === 2 ? deltaY * 400 : deltaY;
	return Math.exp(-Math.max(-300, Math.min(300, px)) * 0.002);
}
