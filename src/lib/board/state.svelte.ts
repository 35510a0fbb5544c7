// Viewport, selection and the active tool: local to this tab, never synced. (Other people see
// the selection through awareness, which the board sets from here.)
import type { Vec2 } from '../trade';
import type { ToolName } from './tools/types';
import { fit, panBy, pinch, toImage, toScreen, zoomAt, type Viewport } from './viewport';

/** A fingertip, in screen pixels: the minimum touch target. */
export const TOUCH_PX = 22;

export class BoardViewState {
	#viewport = $state<Viewport>({ x: 0, y: 0, scale: 1 });
	#width = $state(0);
	#height = $state(0);
	#selection = $state<string[]>([]);
	#tool = $state<ToolName>('select');
	#imageW = $state(0);
	#imageH = $state(0);
	/** Until the person zooms or pans, the photo is refitted whenever the view changes size. */
	#moved = false;

	get viewport(): Viewport {
		return this.#viewport;
	}
	get width() {
		return this.#width;
	}
	get height() {
		return this.#height;
	}
	get selection(): string[] {
		return this.#selection;
	}
	get tool(): ToolName {
		return this.#tool;
	}
	get imageSize(): [number, number] {
		return [this.#imageW, this.#imageH];
	}
	/** Image units per fingertip at the current zoom. */
	get snapRadius(): number {
		return TOUCH_PX / this.#viewport.scale;
	}

	set tool(t: ToolName) {
		this.#tool = t;
	}

	select(ids: string[]) {
		this.#selection = [...ids];
	}

	resize(w: number, h: number) {
		this.#width = w;
		this.#height = h;
		if (!this.#moved && this.#imageW) this.#viewport = fit(this.#imageW, this.#imageH, w, h);
	}

	setImage(w: number, h: number) {
		this.#imageW = w;
		this.#imageH = h;
		if (this.#width && !this.#moved) this.fit();
	}

	fit() {
		this.#moved = false;
		this.#viewport = fit(this.#imageW, this.#imageH, this.#width, this.#height);
	}

	zoomAt(anchor: Vec2, factor: number) {
		this.#moved = true;
		this.#viewport = zoomAt(this.#viewport, anchor, factor);
	}

	/** Zoom about the middle of the view (buttons and keys). */
	zoom(factor: number) {
		this.zoomAt([this.#width / 2, this.#height / 2], factor);
	}

	pan(dx: number, dy: number) {
		this.#moved = true;
		this.#viewport = panBy(this.#viewport, dx, dy);
	}

	pinch(from: [Vec2, Vec2], to: [Vec2, Vec2]) {
		this.#moved = true;
		this.#viewport = pinch(this.#viewport, from, to);
	}

	/** Brings an image position to the middle of the view without changing the zoom. */
	centreOn(p: Vec2) {
		const [sx, sy] = toScreen(this.#viewport, p);
		this.pan(this.#width / 2 - sx, this.#height / 2 - sy);
	}

	toImage(screen: Vec2): Vec2 {
		return toImage(this.#viewport, screen);
	}

	toScreen(image: Vec2): Vec2 {
		return toScreen(this.#viewport, image);
	}
}
