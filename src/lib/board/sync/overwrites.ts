// Tells a person when a value they set lost to someone else's concurrent edit (typically made
// while one of them was offline). Yjs settles two writes of the same field by a fixed rule, so
// one of them silently wins. This remembers which map entry the person's write made for each
// field; when a change from the server leaves another entry current, it looks at that entry's
// origin: written on top of the person's entry, it is a later edit by someone who saw theirs
// (no notice); otherwise the two were concurrent and the person's value lost, and they are told
// both values and who set the winning one (the item's `updatedBy`) so they can put theirs back.
import * as Y from 'yjs';
import { MAP_POINTS, MAP_ROUTES, MAP_ZONES } from '../model/schema';

export interface OverwriteNotice {
	id: string;
	kind: 'point' | 'route' | 'zone';
	itemId: string;
	label: string;
	field: string;
	mine: unknown;
	theirs: unknown;
	/** Who set the value that won, when the item says. */
	by: string | null;
	at: number;
}

interface Written {
	kind: OverwriteNotice['kind'];
	itemId: string;
	field: string;
	value: unknown;
	/** The map entry the write made. */
	entry: Y.ID;
	at: number;
}

/** Writes remembered at most; the oldest are forgotten first. */
const MAX_WRITTEN = 5000;

function sameId(a: Y.ID | null | undefined, b: Y.ID | null | undefined) {
	return !!a && !!b && a.client === b.client && a.clock === b.clock;
}

/** The entry (Yjs item) that currently holds `field` of an item map. */
function currentEntry(map: Y.Map<unknown>, field: string): Y.Item | null {
	return (map as unknown as { _map: Map<string, Y.Item> })._map.get(field) ?? null;
}

const ROOTS: Record<string, OverwriteNotice['kind']> = { [MAP_POINTS]: 'point', [MAP_ROUTES]: 'route', [MAP_ZONES]: 'zone' };
/** Bookkeeping fields: not the person's work. */
const IGNORED = new Set(['updatedBy', 'updatedAt', 'createdAt', 'createdBy']);

function key(w: Pick<Written, 'itemId' | 'field'>) {
	return `${w.itemId}\u0000${w.field}`;
}

function plain(v: unknown): unknown {
	return v instanceof Y.AbstractType ? v.toJSON() : v;
}

/** The root map name and the key of an item map, if `type` is one of the board's items. */
function itemOf(doc: Y.Doc, type: Y.AbstractType<unknown>): { kind: OverwriteNotice['kind']; itemId: string; map: Y.Map<unknown> } | null {
	if (!(type instanceof Y.Map)) return null;
	const parent = type.parent;
	const itemId = type._item?.parentSub;
	if (!(parent instanceof Y.Map) || typeof itemId !== 'string') return null;
	for (const [name, kind] of Object.entries(ROOTS)) if ((doc.share.get(name) as unknown) === parent) return { kind, itemId, map: type };
	return null;
}

export class OverwriteWatch {
	#doc: Y.Doc;
	#written = new Map<string, Written>();
	#isRemote: (origin: unknown) => boolean;
	#onNotice: (n: OverwriteNotice) => void;
	#seq = 0;

	/** `isRemote` says which transaction origins carry other people's changes (the provider). */
	constructor(doc: Y.Doc, isRemote: (origin: unknown) => boolean, onNotice: (n: OverwriteNotice) => void) {
		this.#doc = doc;
		this.#isRemote = isRemote;
		this.#onNotice = onNotice;
		doc.on('afterTransaction', this.#after);
	}

	get watching(): number {
		return this.#written.size;
	}

	destroy() {
		this.#doc.off('afterTransaction', this.#after);
		this.#written.clear();
	}

	#after = (tr: Y.Transaction) => {
		const remote = this.#isRemote(tr.origin);
		if (!remote && !tr.local) return; // the offline copy loading, replays: not a person's write now
		if (!remote) {
			tr.changed.forEach((keys, type) => {
				const item = itemOf(this.#doc, type as Y.AbstractType<unknown>);
				if (!item) return;
				for (const field of keys) {
					if (field === null || IGNORED.has(field)) continue;
					const entry = currentEntry(item.map, field);
					const k = key({ itemId: item.itemId, field });
					this.#written.delete(k);
					if (!entry || entry.deleted) continue;
					this.#written.set(k, {
						kind: item.kind,
						itemId: item.itemId,
						field,
						value: plain(item.map.get(field)),
						entry: entry.id,
						at: Date.now()
					});
				}
			});
			while (this.#written.size > MAX_WRITTEN) this.#written.delete(this.#written.keys().next().value!);
			return;
		}
		if (this.#written.size === 0) return;
		tr.changed.forEach((keys, type) => {
			const item = itemOf(this.#doc, type as Y.AbstractType<unknown>);
			if (!item) return;
			for (const field of keys) {
				if (field === null) continue;
				const w = this.#written.get(key({ itemId: item.itemId, field }));
				if (!w) continue;
				const now = currentEntry(item.map, field);
				if (now && sameId(now.id, w.entry)) continue; // the person's value still stands
				this.#written.delete(key(w));
				// Written on top of the person's entry: a later edit by someone who saw it.
				if (!now || sameId(now.origin, w.entry)) continue;
				const theirs = now.deleted ? undefined : plain(item.map.get(field));
				if (JSON.stringify(theirs) === JSON.stringify(w.value)) continue;
				const by = item.map.get('updatedBy');
				const label = item.map.get('label');
				this.#onNotice({
					id: `ow-${Date.now().toString(36)}-${++this.#seq}`,
					kind: item.kind,
					itemId: item.itemId,
					label: typeof label === 'string' && label.trim() ? label.trim() : item.kind === 'route' ? 'a cable route' : `a ${item.kind}`,
					field,
					mine: w.value,
					theirs,
					by: typeof by === 'string' && by ? by : null,
					at: Date.now()
				});
			}
		});
	};
}
