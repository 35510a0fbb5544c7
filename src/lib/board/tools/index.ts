import { SelectTool } from './select';
import { PointTool } from './point';
import { RouteTool, ZoneTool } from './polyline';
import { MeasureTool, PanTool, ScaleTool } from './line';
import type { Tool, ToolHost, ToolName } from './types';

export * from './types';
export { SelectTool, PointTool, RouteTool, ZoneTool, ScaleTool, MeasureTool, PanTool };

export function createTool(name: ToolName, host: ToolHost): Tool {
	switch (name) {
		case 'select':
			return new SelectTool(host);
		case 'point':
			return new PointTool(host);
		case 'route':
			return new RouteTool(host);
		case 'zone':
			return new ZoneTool(host);
		case 'scale':
			return new ScaleTool(host);
		case 'measure':
			return new MeasureTool(host);
		case 'pan':
			return new PanTool(host);
	}
}

/** Keyboard shortcuts for the tools (single keys, no modifier). */
export const TOOL_KEYS: Record<string, ToolName> = {
	v: 'select',
	p: 'point',
	r: 'route',
	z: 'zone',
	s: 'scale',
	m: 'measure',
	h: 'pan'
};
