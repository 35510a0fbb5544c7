// Tells a person when a value they set while offline lost to someone else's concurrent edit.
// Yjs settles two writes of the same field by a fixed rule, so one of them silently wins; this
// watches the fields the person wrote while their changes were not yet on the server, and when a
// change from the server leaves such a field with another value, reports both values and who
// set the winning one (the item's `updatedBy`), so the person can put theirs back.
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
	#recording = false;
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

	/** Record the person's writes (while their changes are not on the server). */
	set recording(on: boolean) {
		this.#recording = on;
	}
	get recording() {
		return this.#recording;
	}

	/** Everything written is on the server now: forget it. */
	settle() {
		this.#written.clear();
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
		if (!remote && !tr.local) return; // offline copy loading, set-aside replays: not a person's write now
		if (!remote) {
			if (!this.#recording) return;
			tr.changed.forEach((keys, type) => {
				const item = itemOf(this.#doc, type as Y.AbstractType<unknown>);
				if (!item) return;
				for (const field of keys) {
					if (field === null || IGNORED.has(field)) continue;
					this.#written.set(key({ itemId: item.itemId, field }), { kind: item.kind, itemId: item.itemId, field, value: plain(item.map.get(field)) });
				}
			});
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
				const now = plain(item.map.get(field));
				if (JSON.stringify(now) === JSON.stringify(w.value)) continue;
				this.#written.delete(key(w));
				const by = item.map.get('updatedBy');
				const label = item.map.get('label');
				this.#onNotice({
					id: `ow-${Date.now().toString(36)}-${++this.#seq}`,
					kind: item.kind,
					itemId: item.itemId,
					label: typeof label === 'string' && label.trim() ? label.trim() : item.kind === 'route' ? 'a cable route' : `a ${item.kind}`,
					field,
					mine: w.value,
					theirs: now,
					by: typeof by === 'string' && by ? by : null,
					at: Date.now()
				});
			}
		});
	};
}
