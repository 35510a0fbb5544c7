// Work the server did not accept, kept on the device. When the server refuses a change, the
// provider continues on a fresh copy of the server's document; this module compares the
// person's copy with the server's item by item, tries each difference again on its own (most
// offline work is fine; only the part that touches, say, a point approved meanwhile is not),
// and sets aside what still cannot be accepted, with the reason, for the person to turn into a
// new proposal or discard. Pure: Yjs documents in, plain data out.
import * as Y from 'yjs';
import { MAP_META, MAP_POINTS, MAP_ROUTES, MAP_ZONES, META_SCALE } from '../model/schema';

export type SetAsideKind = 'point' | 'route' | 'zone' | 'scale';

export interface FieldDifference {
	field: string;
	/** What the person had. */
	mine: unknown;
	/** What the server holds (undefined: not set there). */
	server: unknown;
}

/** One item that differs between the person's copy and the server's. */
export interface ItemDifference {
	kind: SetAsideKind;
	itemId: string;
	action: 'added' | 'changed' | 'deleted';
	/** The item as the person had it (added, changed), or as the server has it (deleted). */
	item: Record<string, unknown>;
	fields: FieldDifference[];
}

/** A difference that was not accepted, as kept in the tray. */
export interface SetAsideEntry extends ItemDifference {
	/** Tray entry id. */
	id: string;
	/** A short name for the item, e.g. "P3" or "cable route from P3". */
	label: string;
	reason: string;
	at: number;
}

const KIND_MAPS: Array<[Exclude<SetAsideKind, 'scale'>, string]> = [
	['point', MAP_POINTS],
	['route', MAP_ROUTES],
	['zone', MAP_ZONES]
];

function plain(v: unknown): unknown {
	if (v instanceof Y.AbstractType) return v.toJSON();
	return v;
}

function itemJson(m: unknown): Record<string, unknown> | null {
	if (!(m instanceof Y.Map)) return null;
	const out: Record<string, unknown> = {};
	m.forEach((v, k) => (out[k] = plain(v)));
	return out;
}

function same(a: unknown, b: unknown): boolean {
	return JSON.stringify(a) === JSON.stringify(b);
}

/** Items added, changed or deleted in `mine` compared with `server`. */
export function diffBoards(mine: Y.Doc, server: Y.Doc): ItemDifference[] {
	const out: ItemDifference[] = [];
	for (const [kind, name] of KIND_MAPS) {
		const a = mine.getMap<unknown>(name);
		const b = server.getMap<unknown>(name);
		a.forEach((value, id) => {
			const item = itemJson(value);
			if (!item) return;
			const theirs = itemJson(b.get(id));
			if (!theirs) {
				out.push({ kind, itemId: id, action: 'added', item, fields: [] });
				return;
			}
			const fields: FieldDifference[] = [];
			for (const key of new Set([...Object.keys(item), ...Object.keys(theirs)])) {
				if (!same(item[key], theirs[key])) fields.push({ field: key, mine: item[key], server: theirs[key] });
			}
			if (fields.length) out.push({ kind, itemId: id, action: 'changed', item, fields });
		});
		b.forEach((value, id) => {
			const theirs = itemJson(value);
			if (theirs && !(a.get(id) instanceof Y.Map)) out.push({ kind, itemId: id, action: 'deleted', item: theirs, fields: [] });
		});
	}
	const sa = plain(mine.getMap<unknown>(MAP_META).get(META_SCALE));
	const sb = plain(server.getMap<unknown>(MAP_META).get(META_SCALE));
	if (!same(sa, sb)) {
		out.push({
			kind: 'scale',
			itemId: META_SCALE,
			action: sa === undefined ? 'deleted' : sb === undefined ? 'added' : 'changed',
			item: (sa ?? sb ?? {}) as Record<string, unknown>,
			fields: [{ field: META_SCALE, mine: sa, server: sb }]
		});
	}
	return out;
}

/**
 * What the person did that the server does not hold, item by item. Only the person's own
 * structs (those the server's state vector lacks) are laid over the server's copy, so a newer
 * change by someone else is never mistaken for the person's work and undone.
 */
export function unacceptedWork(mine: Y.Doc, server: Y.Doc): ItemDifference[] {
	const merged = new Y.Doc();
	try {
		Y.applyUpdate(merged, Y.encodeStateAsUpdate(server));
		Y.applyUpdate(merged, Y.encodeStateAsUpdate(mine, Y.encodeStateVector(server)));
		return diffBoards(merged, server);
	} finally {
		merged.destroy();
	}
}

/** Writes one difference into a document (inside the caller's transaction). */
export function writeDifference(doc: Y.Doc, d: ItemDifference): void {
	if (d.kind === 'scale') {
		const meta = doc.getMap<unknown>(MAP_META);
		if (d.action === 'deleted') meta.delete(META_SCALE);
		else meta.set(META_SCALE, d.item);
		return;
	}
	const root = doc.getMap<unknown>(KIND_MAPS.find(([k]) => k === d.kind)![1]);
	if (d.action === 'deleted') {
		root.delete(d.itemId);
		return;
	}
	let m = root.get(d.itemId);
	if (!(m instanceof Y.Map)) {
		m = new Y.Map<unknown>();
		root.set(d.itemId, m);
	}
	const target = m as Y.Map<unknown>;
	if (d.action === 'added') {
		for (const [k, v] of Object.entries(d.item)) target.set(k, v);
		return;
	}
	for (const f of d.fields) {
		if (f.mine === undefined) target.delete(f.field);
		else target.set(f.field, f.mine);
	}
}

/**
 * The update that writing `d` into `doc` would make, without changing `doc`. The copy writes
 * under `doc`'s own client id, so the update can be applied to `doc` as its own change.
 */
export function updateFor(doc: Y.Doc, d: ItemDifference): Uint8Array | null {
	const copy = new Y.Doc();
	copy.clientID = doc.clientID;
	Y.applyUpdate(copy, Y.encodeStateAsUpdate(doc));
	let update: Uint8Array | null = null;
	copy.on('update', (u: Uint8Array) => (update = update ? Y.mergeUpdates([update, u]) : u));
	copy.transact(() => writeDifference(copy, d));
	copy.destroy();
	return update;
}

/**
 * Says why an update may not be written to a document, or null when it may. The board page
 * passes the board policy with the signed-in person as the actor.
 */
export type ChangeCheck = (doc: Y.Doc, update: Uint8Array) => string | null;

export interface Reapplied {
	/** Differences written again into the server's copy (they go to the server as new changes). */
	kept: ItemDifference[];
	/** Differences that are still refused, with the reason. */
	refused: Array<{ difference: ItemDifference; reason: string }>;
}

/**
 * Tries each difference again on the server's copy, one at a time, with `check`; what passes is
 * applied with `origin`, the rest is returned with the reason (or `fallbackReason` without a check).
 */
export function reapply(
	fresh: Y.Doc,
	differences: ItemDifference[],
	check: ChangeCheck | null,
	fallbackReason: string,
	origin: unknown
): Reapplied {
	const kept: ItemDifference[] = [];
	const refused: Reapplied['refused'] = [];
	// Points first, so a route or a change that needs its point finds it.
	const order: Record<SetAsideKind, number> = { point: 0, zone: 1, route: 2, scale: 3 };
	for (const d of [...differences].sort((a, b) => order[a.kind] - order[b.kind])) {
		if (!check) {
			refused.push({ difference: d, reason: fallbackReason });
			continue;
		}
		const update = updateFor(fresh, d);
		if (!update) continue;
		const why = check(fresh, update);
		if (why) {
			refused.push({ difference: d, reason: why });
			continue;
		}
		Y.applyUpdate(fresh, update, origin);
		kept.push(d);
	}
	return { kept, refused };
}

/** A readable name for an item in the tray. */
export function labelFor(d: ItemDifference, doc: Y.Doc): string {
	if (d.kind === 'scale') return 'the board scale';
	const text = (v: unknown) => (typeof v === 'string' && v.trim() ? v.trim() : null);
	if (d.kind === 'point') return text(d.item.label) ?? 'a measurement point';
	if (d.kind === 'zone') return `keep-out zone${text(d.item.label) ? ` ${text(d.item.label)}` : ''}`;
	const pointId = d.item.pointId;
	const point = typeof pointId === 'string' ? doc.getMap<unknown>(MAP_POINTS).get(pointId) : null;
	const pointLabel = point instanceof Y.Map ? text(point.get('label')) : null;
	return pointLabel ? `cable route from ${pointLabel}` : 'a cable route';
}

/** Plain words for what the person had done. */
export function describe(e: Pick<SetAsideEntry, 'action' | 'fields' | 'label' | 'kind'>): string {
	if (e.action === 'added') return `Added ${e.label}`;
	if (e.action === 'deleted') return `Deleted ${e.label}`;
	const names = e.fields.map((f) => f.field).filter((f) => f !== 'updatedBy' && f !== 'updatedAt');
	return `Changed ${names.slice(0, 4).join(', ')}${names.length > 4 ? ` and ${names.length - 4} more` : ''} of ${e.label}`;
}
