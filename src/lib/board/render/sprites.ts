// Bitmaps drawn once and stamped many times: a marker per severity, and each label with its
// white halo. Drawing 1,000 markers is then 1,000 image copies per frame instead of 4,000
// paths, and text is measured and stroked once per label, never per frame or per zoom step.
import { SEVERITY_META, type Severity } from '../../trade';
import { HALO, severityColour } from './palette';

export const LABEL_FONT = '"Figtree", system-ui, sans-serif';
/** Half the size of the largest marker (the triangle with its shadow), px. */
export const MARKER_RADIUS = 20;

export interface Sprite {
	canvas: HTMLCanvasElement;
	/** Size in CSS px. */
	w: number;
	h: number;
	/** Where the anchor sits inside the sprite, CSS px. */
	ox: number;
	oy: number;
}

function canvas(w: number, h: number, ratio: number) {
	const c = document.createElement('canvas');
	c.width = Math.max(1, Math.ceil(w * ratio));
	c.height = Math.max(1, Math.ceil(h * ratio));
	const ctx = c.getContext('2d')!;
	ctx.scale(ratio, ratio);
	return { c, ctx };
}

function triangle(ctx: CanvasRenderingContext2D, x: number, y: number, r: number) {
	ctx.beginPath();
	for (let i = 0; i < 3; i++) {
		const a = (i * 2 * Math.PI) / 3;
		const px = x + r * Math.sin(a);
		const py = y - r * Math.cos(a);
		if (i === 0) ctx.moveTo(px, py);
		else ctx.lineTo(px, py);
	}
	ctx.closePath();
}

/** The marker of a point: circle (meets the rules), triangle (check), square (fails). */
function drawMarker(ctx: CanvasRenderingContext2D, x: number, y: number, severity: Severity, size = 12) {
	const shape = SEVERITY_META[severity].shape;
	const fill = severityColour(severity).fill;
	ctx.lineWidth = 2.5;
	ctx.strokeStyle = HALO;
	if (shape === 'circle') {
		ctx.fillStyle = 'rgba(0,0,0,0.55)';
		ctx.beginPath();
		ctx.arc(x, y, size + 2, 0, Math.PI * 2);
		ctx.fill();
		ctx.fillStyle = fill;
		ctx.beginPath();
		ctx.arc(x, y, size, 0, Math.PI * 2);
		ctx.fill();
		ctx.stroke();
	} else if (shape === 'triangle') {
		ctx.fillStyle = 'rgba(0,0,0,0.55)';
		triangle(ctx, x, y + 2, size * 1.45 + 2.5);
		ctx.fill();
		ctx.fillStyle = fill;
		triangle(ctx, x, y + 2, size * 1.45);
		ctx.fill();
		ctx.stroke();
	} else {
		ctx.fillStyle = 'rgba(0,0,0,0.55)';
		ctx.fillRect(x - size - 2, y - size - 2, (size + 2) * 2, (size + 2) * 2);
		ctx.fillStyle = fill;
		ctx.fillRect(x - size, y - size, size * 2, size * 2);
		ctx.strokeRect(x - size, y - size, size * 2, size * 2);
	}
}

export class SpriteCache {
	#ratio: number;
	#markers = new Map<string, Sprite>();
	#labels = new Map<string, Sprite>();
	#widths = new Map<string, number>();
	#measure: CanvasRenderingContext2D;
	/** Labels kept at most; the oldest are dropped first. */
	#max = 3000;

	constructor(ratio: number) {
		this.#ratio = ratio;
		this.#measure = document.createElement('canvas').getContext('2d')!;
	}

	/** After the web font arrives, labels drawn with the fallback font are drawn again. */
	clearText() {
		this.#labels.clear();
		this.#widths.clear();
	}

	marker(severity: Severity, faded: boolean): Sprite {
		const key = `${severity}|${faded}`;
		let s = this.#markers.get(key);
		if (!s) {
			const size = MARKER_RADIUS * 2;
			const { c, ctx } = canvas(size, size, this.#ratio);
			ctx.globalAlpha = faded ? 0.55 : 1;
			drawMarker(ctx, MARKER_RADIUS, MARKER_RADIUS, severity);
			s = { canvas: c, w: size, h: size, ox: MARKER_RADIUS, oy: MARKER_RADIUS };
			this.#markers.set(key, s);
		}
		return s;
	}

	static font(size: number, bold: boolean) {
		return `${bold ? 'bold ' : ''}${size}px ${LABEL_FONT}`;
	}

	/** Width and height of a label box (text plus halo), px. */
	size(text: string, size: number, bold: boolean): { w: number; h: number } {
		const font = SpriteCache.font(size, bold);
		const key = `${font}|${text}`;
		let w = this.#widths.get(key);
		if (w === undefined) {
			this.#measure.font = font;
			w = Math.ceil(this.#measure.measureText(text).width) + 6;
			this.#widths.set(key, w);
		}
		return { w, h: Math.ceil(size * 1.25) + 4 };
	}

	label(text: string, size: number, colour: string, bold = true): Sprite {
		const font = SpriteCache.font(size, bold);
		const key = `${font}|${colour}|${text}`;
		let s = this.#labels.get(key);
		if (s) {
			// Most recently used last.
			this.#labels.delete(key);
			this.#labels.set(key, s);
			return s;
		}
		const { w, h } = this.size(text, size, bold);
		const { c, ctx } = canvas(w, h, this.#ratio);
		ctx.font = font;
		ctx.textBaseline = 'middle';
		ctx.lineJoin = 'round';
		ctx.lineWidth = 4;
		ctx.strokeStyle = HALO;
		ctx.strokeText(text, 3, h / 2);
		ctx.fillStyle = colour;
		ctx.fillText(text, 3, h / 2);
		s = { canvas: c, w, h, ox: 0, oy: 0 };
		this.#labels.set(key, s);
		if (this.#labels.size > this.#max) this.#labels.delete(this.#labels.keys().next().value!);
		return s;
	}
}
