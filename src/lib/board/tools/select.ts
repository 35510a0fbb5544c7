import type { Vec2 } from '../../trade';
import { deleteItems, movePoint, setRouteVertices, setZonePolygon } from '../model/ops';
import { BaseTool } from './base';
import type { Draft, HitTarget, ToolPointer } from './types';

type Drag =
	| { mode: 'move'; id: string; x: number; y: number }
	| { mode: 'vertex'; owner: 'route' | 'zone'; id: string; index: number; x: number; y: number }
	| { mode: 'pan' };

/** Tap to select; drag a point or a corner to move it; drag elsewhere to pan; Delete removes. */
export class SelectTool extends BaseTool {
	readonly name = 'select' as const;
	#drag: Drag | null = null;

	hint(): string {
		if (this.#drag?.mode === 'move') return 'Let go where the point should be.';
		if (this.#drag?.mode === 'vertex') return 'Let go where the corner should be.';
		if (!this.host.canEdit())
			return this.host.selection().length
				? 'Read-only for you: tap empty space to clear the selection. Drag to pan.'
				: 'Tap a point, route or zone to see it. Drag to pan.';
		return this.host.selection().length
			? 'Drag to move. Delete removes the selection. Tap empty space to clear it.'
			: 'Tap a point, route or zone to see and edit it. Drag empty space to pan.';
	}

	draft(): Draft | null {
		const d = this.#drag;
		if (d?.mode === 'move') return { kind: 'move', id: d.id, x: d.x, y: d.y };
		if (d?.mode === 'vertex') return { kind: 'vertex', owner: d.owner, id: d.id, index: d.index, x: d.x, y: d.y };
		return null;
	}

	protected onTap(p: ToolPointer): void {
		const id = ownerOf(p.target);
		this.host.select(id ? [id] : []);
	}

	protected onDragStart(start: ToolPointer, p: ToolPointer): void {
		const t = start.target;
		const editable = this.host.canEdit();
		if (editable && t?.kind === 'point') {
			this.host.select([t.id]);
			this.#drag = { mode: 'move', id: t.id, x: p.x, y: p.y };
		} else if (editable && t?.kind === 'vertex' && !(t.owner === 'route' && t.index === 0)) {
			// A route's first corner belongs to its point and moves with it.
			this.#drag = { mode: 'vertex', owner: t.owner, id: t.id, index: t.index, x: p.x, y: p.y };
		} else {
			this.#drag = { mode: 'pan' };
		}
	}

	protected onDrag(p: ToolPointer, last: ToolPointer): void {
		const d = this.#drag;
		if (d && d.mode !== 'pan') {
			d.x = p.x;
			d.y = p.y;
		} else super.onDrag(p, last);
	}

	protected onDragEnd(p: ToolPointer): void {
		const d = this.#drag;
		this.#drag = null;
		if (!d || d.mode === 'pan') return;
		if (d.mode === 'move') {
			movePoint(this.host.doc, d.id, p.x, p.y);
			return;
		}
		const board = this.host.board();
		const at: Vec2 = [p.x, p.y];
		if (d.owner === 'route') {
			const r = board.routes.find((x) => x.id === d.id);
			if (r && d.index < r.vertices.length)
				setRouteVertices(
					this.host.doc,
					d.id,
					r.vertices.map((v, i) => (i === d.index ? at : v))
				);
		} else {
			const z = board.zones.find((x) => x.id === d.id);
			if (z && d.index < z.polygon.length)
				setZonePolygon(
					this.host.doc,
					d.id,
					z.polygon.map((v, i) => (i === d.index ? at : v))
				);
		}
	}

	protected onDragAbort(): void {
		this.#drag = null;
	}

	key(key: string): boolean {
		if (key === 'Delete' || key === 'Backspace') {
			const ids = this.host.selection();
			if (!ids.length || !this.guardEdit()) return ids.length > 0;
			deleteItems(this.host.doc, ids);
			this.host.select([]);
			return true;
		}
		if (key === 'Escape' && this.host.selection().length) {
			this.host.select([]);
			return true;
		}
		return false;
	}

	cancel(): void {
		super.cancel();
		this.#drag = null;
	}
}

export function ownerOf(t: HitTarget): string | null {
	if (!t) return null;
	return t.id;
}
