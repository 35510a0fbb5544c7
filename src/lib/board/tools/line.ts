import type { Vec2 } from '../../trade';
import { setScale } from '../model/ops';
import { BaseTool } from './base';
import type { Draft, ToolPointer } from './types';
import { TAP_SLOP_PX } from './types';

type Phase = 'idle' | 'first' | 'drag' | 'done';

/** A straight line: drag from end to end, or tap both ends. */
abstract class LineTool extends BaseTool {
	protected phase: Phase = 'idle';
	protected a: Vec2 = [0, 0];
	protected b: Vec2 = [0, 0];
	protected abstract readonly purpose: 'scale' | 'measure';

	draft(): Draft | null {
		if (this.phase === 'idle') return null;
		return { kind: 'line', purpose: this.purpose, a: this.a, b: this.b, done: this.phase === 'done' };
	}

	protected onHover(p: ToolPointer): void {
		if (this.phase === 'first') this.b = [p.x, p.y];
	}

	protected onTap(p: ToolPointer): void {
		if (this.phase === 'first') {
			this.b = [p.x, p.y];
			this.#complete();
			return;
		}
		this.a = [p.x, p.y];
		this.b = [p.x, p.y];
		this.phase = 'first';
		this.started();
	}

	protected onDragStart(start: ToolPointer, p: ToolPointer): void {
		this.a = [start.x, start.y];
		this.b = [p.x, p.y];
		this.phase = 'drag';
		this.started();
	}

	protected onDrag(p: ToolPointer): void {
		this.b = [p.x, p.y];
	}

	protected onDragEnd(p: ToolPointer): void {
		this.b = [p.x, p.y];
		this.#complete();
	}

	protected onDragAbort(): void {
		this.phase = 'idle';
	}

	#complete() {
		// The slop is in screen pixels; the snap radius converts a touch size to image pixels.
		const minLen = (this.host.snapRadius() * TAP_SLOP_PX) / 22;
		if (Math.hypot(this.b[0] - this.a[0], this.b[1] - this.a[1]) < minLen) {
			this.host.say('The line is too short: drag from one end to the other, or tap both ends.');
			this.phase = 'idle';
			return;
		}
		this.phase = 'done';
		this.completed();
	}

	protected started(): void {}
	protected completed(): void {}

	key(key: string): boolean {
		if (key === 'Escape' && this.phase !== 'idle') {
			this.cancel();
			return true;
		}
		return false;
	}

	cancel(): void {
		super.cancel();
		this.phase = 'idle';
	}

	line(): { a: Vec2; b: Vec2 } | null {
		return this.phase === 'done' ? { a: this.a, b: this.b } : null;
	}
}

/** Set the scale: draw along something of known size, then type its real length. */
export class ScaleTool extends LineTool {
	readonly name = 'scale' as const;
	protected readonly purpose = 'scale' as const;

	hint(): string {
		if (this.phase === 'done') return 'Type the real length of the line in mm.';
		if (this.phase === 'first') return 'Tap the other end.';
		return 'Drag along something of known length (or tap both ends), e.g. a coupling guard or a flange.';
	}

	protected started(): void {
		if (!this.host.canEdit()) this.guardEdit();
	}

	protected completed(): void {
		if (!this.host.canEdit()) this.phase = 'idle';
	}

	/** Stores the scale; returns an error message for the length field, or null. */
	confirm(lengthMm: number): string | null {
		const l = this.line();
		if (!l) return 'Draw the reference line first.';
		if (!this.guardEdit()) return 'This board is read-only for you.';
		if (!Number.isFinite(lengthMm) || lengthMm <= 0 || lengthMm > 100_000) return 'Enter the real length in mm, above 0 and up to 100 000.';
		setScale(this.host.doc, { a: l.a, b: l.b, lengthMm });
		this.phase = 'idle';
		return null;
	}
}

/** Measure a distance on the photo; with a scale it reads in mm (an estimate). */
export class MeasureTool extends LineTool {
	readonly name = 'measure' as const;
	protected readonly purpose = 'measure' as const;

	hint(): string {
		if (this.phase === 'first') return 'Tap the other end.';
		if (this.phase === 'done') return 'Drag or tap again to measure something else.';
		return 'Drag from one end to the other (or tap both ends) to measure.';
	}
}

/** Drag to pan; nothing else. */
export class PanTool extends BaseTool {
	readonly name = 'pan' as const;
	hint(): string {
		return 'Drag to move around the photo. Pinch or use the wheel to zoom.';
	}
}
