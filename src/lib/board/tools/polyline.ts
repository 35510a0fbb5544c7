import type { Vec2 } from '../../trade';
import { addRoute, addZone } from '../model/ops';
import { BaseTool } from './base';
import type { Draft, ToolPointer } from './types';

const near = (a: Vec2, b: Vec2, r: number) => Math.hypot(a[0] - b[0], a[1] - b[1]) <= r;

/**
 * Cable route: starts on a measurement point, one tap per bend, and ends at the supply point or
 * where the cable leaves the photo (tap the last bend again, press Enter or Finish).
 */
export class RouteTool extends BaseTool {
	readonly name = 'route' as const;
	#pointId: string | null = null;
	#vertices: Vec2[] = [];
	#hover: Vec2 | null = null;

	hint(): string {
		if (!this.#pointId) return 'Tap the measurement point the cable starts from.';
		if (this.#vertices.length < 2) return 'Tap each bend of the cable run.';
		return 'Tap each bend; finish at the supply point or where the cable leaves the photo (tap the last bend again, or Finish).';
	}

	draft(): Draft | null {
		return this.#pointId ? { kind: 'polyline', points: [...this.#vertices], hover: this.#hover } : null;
	}

	protected onHover(p: ToolPointer): void {
		this.#hover = [p.x, p.y];
	}

	/** Starts a route at a point chosen elsewhere (the point's "Draw its cable route" button). */
	startAt(pointId: string): boolean {
		const point = this.host.board().points.find((q) => q.id === pointId);
		if (!point || !this.guardEdit()) return false;
		this.#pointId = point.id;
		this.#vertices = [[point.x, point.y]];
		return true;
	}

	protected onTap(p: ToolPointer): void {
		if (!this.guardEdit()) return;
		const at: Vec2 = [p.x, p.y];
		if (!this.#pointId) {
			const target = p.target;
			const point = target?.kind === 'point' ? this.host.board().points.find((q) => q.id === target.id) : undefined;
			if (!point) {
				this.host.say('Start the cable route on a measurement point: tap a point first.');
				return;
			}
			this.#pointId = point.id;
			this.#vertices = [[point.x, point.y]];
			this.host.select([point.id]);
			return;
		}
		const last = this.#vertices[this.#vertices.length - 1];
		if (near(at, last, this.host.snapRadius())) {
			if (!this.finish()) this.host.say('Tap at least one more bend or the end of the run first.');
			return;
		}
		this.#vertices.push(at);
	}

	key(key: string): boolean {
		if (!this.#pointId) return false;
		if (key === 'Enter') return this.finish() || true;
		if (key === 'Escape') {
			this.cancel();
			return true;
		}
		if (key === 'Backspace') {
			if (this.#vertices.length > 1) this.#vertices.pop();
			else this.cancel();
			return true;
		}
		return false;
	}

	canFinish(): boolean {
		return this.#pointId !== null && this.#vertices.length >= 2;
	}

	finish(): boolean {
		if (!this.canFinish() || !this.#pointId) return false;
		const id = addRoute(this.host.doc, { pointId: this.#pointId, vertices: this.#vertices });
		this.#reset();
		this.host.select([id]);
		return true;
	}

	cancel(): void {
		super.cancel();
		this.#reset();
	}

	#reset() {
		this.#pointId = null;
		this.#vertices = [];
		this.#hover = null;
	}
}

/** Keep-out zone: one tap per corner around the rotating part; tap the first corner to close. */
export class ZoneTool extends BaseTool {
	readonly name = 'zone' as const;
	#corners: Vec2[] = [];
	#hover: Vec2 | null = null;

	hint(): string {
		if (this.#corners.length === 0) return 'Tap the corners around a shaft, coupling, belt or fan.';
		if (this.#corners.length < 3) return 'Keep tapping corners around the rotating part.';
		return 'Tap the first corner (or Finish) to close the keep-out zone.';
	}

	draft(): Draft | null {
		return this.#corners.length
			? { kind: 'polygon', points: [...this.#corners], hover: this.#hover, closable: this.#corners.length >= 3 }
			: null;
	}

	protected onHover(p: ToolPointer): void {
		this.#hover = [p.x, p.y];
	}

	protected onTap(p: ToolPointer): void {
		if (!this.guardEdit()) return;
		const at: Vec2 = [p.x, p.y];
		const r = this.host.snapRadius();
		if (this.#corners.length >= 3 && near(at, this.#corners[0], r)) {
			this.finish();
			return;
		}
		if (this.#corners.length && near(at, this.#corners[this.#corners.length - 1], r)) return;
		this.#corners.push(at);
	}

	key(key: string): boolean {
		if (!this.#corners.length) return false;
		if (key === 'Enter') return this.finish() || true;
		if (key === 'Escape') {
			this.cancel();
			return true;
		}
		if (key === 'Backspace') {
			this.#corners.pop();
			return true;
		}
		return false;
	}

	canFinish(): boolean {
		return this.#corners.length >= 3;
	}

	finish(): boolean {
		if (!this.canFinish()) return false;
		const id = addZone(this.host.doc, { polygon: this.#corners });
		this.#corners = [];
		this.#hover = null;
		this.host.select([id]);
		return true;
	}

	cancel(): void {
		super.cancel();
		this.#corners = [];
		this.#hover = null;
	}
}
