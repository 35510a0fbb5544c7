// Tools are small state machines: pointer and key events in, model operations and a draft
// (what to draw while a gesture is under way) out. They know nothing of Konva or Svelte, so
// they are tested with a plain Y.Doc.
import type * as Y from 'yjs';
import type { Vec2 } from '../../trade';
import type { BoardSnapshot } from '../model/schema';

export type ToolName = 'select' | 'point' | 'route' | 'zone' | 'scale' | 'measure' | 'pan';

export type HitTarget =
	{ kind: 'point' | 'route' | 'zone'; id: string } | { kind: 'vertex'; owner: 'route' | 'zone'; id: string; index: number } | null;

export interface ToolPointer {
	/** Image coordinates. */
	x: number;
	y: number;
	/** Screen coordinates (for tap-versus-drag and panning). */
	sx: number;
	sy: number;
	/** What is under the pointer, from the canvas hit test. */
	target: HitTarget;
}

export interface ToolHost {
	doc: Y.Doc;
	board(): BoardSnapshot;
	selection(): string[];
	select(ids: string[]): void;
	/** Pans the view by a screen distance. */
	panBy(dx: number, dy: number): void;
	/** Image-space distance that counts as "on the same spot" at the current zoom. */
	snapRadius(): number;
	/** Name written on new points. */
	userName: string;
	/** False for viewers and frozen boards: tools only select and pan. */
	canEdit(): boolean;
	/** A short message for the person (e.g. why a tap did nothing). */
	say(message: string): void;
}

export type Draft =
	| { kind: 'move'; id: string; x: number; y: number }
	| { kind: 'vertex'; owner: 'route' | 'zone'; id: string; index: number; x: number; y: number }
	| { kind: 'polyline'; points: Vec2[]; hover: Vec2 | null }
	| { kind: 'polygon'; points: Vec2[]; hover: Vec2 | null; closable: boolean }
	| { kind: 'line'; purpose: 'scale' | 'measure'; a: Vec2; b: Vec2; done: boolean };

export interface Tool {
	readonly name: ToolName;
	/** What to do next, in a few words, for the toolbar hint. */
	hint(): string;
	draft(): Draft | null;
	down(p: ToolPointer): void;
	move(p: ToolPointer): void;
	up(p: ToolPointer): void;
	/** Returns true when the key was used. */
	key(key: string): boolean;
	/** Ends a press without acting on it (e.g. a second finger arrived to pinch). */
	abortPress(): void;
	/** Drops any work in progress (Escape, switching tools). */
	cancel(): void;
	/** Completes a multi-tap drawing (Enter, or the Finish button); false when not possible yet. */
	finish(): boolean;
	/** Whether finish() would do something now, to enable the Finish button. */
	canFinish(): boolean;
}

/** Screen pixels a finger may wander before a tap becomes a drag. */
export const TAP_SLOP_PX = 10;
