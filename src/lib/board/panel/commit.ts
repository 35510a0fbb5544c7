// Turns a typed value into a validated model edit; returns the message to show beside the
// field, or null when the edit was stored.
import type * as Y from 'yjs';
import { z } from 'zod';
import {
	checkField,
	fieldInput,
	pointFieldsSchema,
	routeFieldsSchema,
	zoneFieldsSchema,
	type PointFieldKey,
	type RouteFieldKey
} from '../../schemas/board';
import { decidePoint, updatePoint, updateRoute, updateZone, type Decider } from '../model/ops';

type Kind = 'number' | 'choice' | 'text';

function guarded(fn: () => void): string | null {
	try {
		fn();
		return null;
	} catch (e) {
		if (e instanceof z.ZodError) return e.issues[0]?.message ?? 'Not a valid value.';
		return (e as Error).message;
	}
}

export function pointCommit(doc: Y.Doc, id: string, key: PointFieldKey, kind: Kind) {
	return (raw: string): string | null => {
		const v = fieldInput(kind, raw);
		const err = checkField(pointFieldsSchema, key, v);
		return err ?? guarded(() => updatePoint(doc, id, { [key]: v }));
	};
}

/** The status goes with who set it and when, so a later refusal can name the decider. */
export function statusCommit(doc: Y.Doc, id: string, by: Decider) {
	return (raw: string): string | null => {
		const v = fieldInput('choice', raw);
		const err = checkField(pointFieldsSchema, 'status', v);
		return err ?? guarded(() => decidePoint(doc, id, pointFieldsSchema.shape.status.parse(v), by));
	};
}

export function routeCommit(doc: Y.Doc, id: string, key: Exclude<RouteFieldKey, 'pointId'>, kind: Kind) {
	return (raw: string): string | null => {
		const v = fieldInput(kind, raw);
		const err = checkField(routeFieldsSchema, key, v);
		return err ?? guarded(() => updateRoute(doc, id, { [key]: v }));
	};
}

export function zoneCommit(doc: Y.Doc, id: string, key: 'label' | 'kind', kind: Kind) {
	return (raw: string): string | null => {
		const v = fieldInput(kind, raw);
		const err = checkField(zoneFieldsSchema, key, v);
		return err ?? guarded(() => updateZone(doc, id, { [key]: v }));
	};
}

export const str = (v: string | number | null | undefined) => (v === null || v === undefined ? '' : String(v));
