import type { Draft, Tool, ToolHost, ToolName, ToolPointer } from './types';
import { TAP_SLOP_PX } from './types';

interface Press {
	start: ToolPointer;
	last: ToolPointer;
	dragging: boolean;
}

/**
 * Tells a tap from a drag (a finger wanders a little on glass) and hands each to the tool.
 * By default a drag pans the view, so every drawing tool can still be panned with one finger.
 */
export abstract class BaseTool implements Tool {
	abstract readonly name: ToolName;
	protected press: Press | null = null;

	constructor(protected host: ToolHost) {}

	abstract hint(): string;

	draft(): Draft | null {
		return null;
	}

	down(p: ToolPointer): void {
		this.press = { start: p, last: p, dragging: false };
	}

	move(p: ToolPointer): void {
		const pr = this.press;
		if (!pr) {
			this.onHover(p);
			return;
		}
		if (!pr.dragging && Math.hypot(p.sx - pr.start.sx, p.sy - pr.start.sy) > TAP_SLOP_PX) {
			pr.dragging = true;
			this.onDragStart(pr.start, p);
		}
		if (pr.dragging) this.onDrag(p, pr.last);
		pr.last = p;
	}

	up(p: ToolPointer): void {
		const pr = this.press;
		this.press = null;
		if (!pr) return;
		if (pr.dragging) this.onDragEnd(p);
		else this.onTap(pr.start);
	}

	abortPress(): void {
		const pr = this.press;
		this.press = null;
		if (pr?.dragging) this.onDragAbort();
	}

	key(_key: string): boolean {
		return false;
	}

	cancel(): void {
		this.abortPress();
	}

	finish(): boolean {
		return false;
	}

	canFinish(): boolean {
		return false;
	}

	protected onHover(_p: ToolPointer): void {}
	protected onTap(_p: ToolPointer): void {}
	protected onDragStart(_start: ToolPointer, _p: ToolPointer): void {}
	protected onDrag(p: ToolPointer, last: ToolPointer): void {
		this.host.panBy(p.sx - last.sx, p.sy - last.sy);
	}
	protected onDragEnd(_p: ToolPointer): void {}
	protected onDragAbort(): void {}

	protected guardEdit(): boolean {
		if (this.host.canEdit()) return true;
		this.host.say('This board is read-only for you: you can look, select and pan.');
		return false;
	}
}
