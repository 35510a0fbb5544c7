import { addPoint } from '../model/ops';
import { BaseTool } from './base';
import type { ToolPointer } from './types';

/** Tap to place a measurement point (it is selected so its details can be filled in). */
export class PointTool extends BaseTool {
	readonly name = 'point' as const;

	hint(): string {
		return 'Tap where a sensor should go. Tap an existing point to open it. Drag to pan.';
	}

	protected onTap(p: ToolPointer): void {
		if (p.target?.kind === 'point') {
			this.host.select([p.target.id]);
			return;
		}
		if (!this.guardEdit()) return;
		const id = addPoint(this.host.doc, { x: p.x, y: p.y, createdBy: this.host.userName });
		this.host.select([id]);
	}
}
