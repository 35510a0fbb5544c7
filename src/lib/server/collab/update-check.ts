// Looking inside a Yjs update before it touches a document.
import * as Y from 'yjs';

export type DecodedUpdate = ReturnType<typeof Y.decodeUpdate>;

/** Decodes every struct and the delete set; throws on anything malformed or truncated. */
export function decodeUpdateStrict(update: Uint8Array): DecodedUpdate {
	return Y.decodeUpdate(update);
}

export function isEmptyUpdate(d: DecodedUpdate): boolean {
	return d.structs.length === 0 && d.ds.clients.size === 0;
}

/**
 * True when applying the update would change nothing in `doc`: every struct is already known
 * and every deletion already done. A client that reconnects sends its whole delete set with its
 * sync step 2, so a read-only member's client sends such updates without having changed anything.
 */
export function isCoveredBy(doc: Y.Doc, d: DecodedUpdate): boolean {
	const store = doc.store;
	for (const s of d.structs) {
		if (s instanceof Y.Skip) continue;
		if (s.id.clock + s.length > Y.getState(store, s.id.client)) return false;
	}
	for (const [client, ranges] of d.ds.clients) {
		if (ranges.length === 0) continue;
		const structs = store.clients.get(client);
		const known = Y.getState(store, client);
		for (const r of ranges) {
			if (r.len === 0) continue;
			if (!structs || r.clock + r.len > known) return false;
			let i = Y.findIndexSS(structs, r.clock);
			const end = r.clock + r.len;
			while (i < structs.length && structs[i].id.clock < end) {
				if (!structs[i].deleted) return false;
				i++;
			}
		}
	}
	return true;
}

/** Point statuses that record a review decision: only roles that may decide can write them. */
export const REVIEW_DECISIONS: ReadonlySet<string> = new Set(['approved', 'rejected', 'flagged']);

/**
 * The review decision an update would write into a point's status, or null. Yjs does not always
 * name the map key inside an update (an overwrite refers to the previous entry instead), so the
 * update is applied to a shadow copy of the room's document and the change is read from there.
 * Returns whether the shadow is still usable (false when the update was refused, since the
 * shadow then holds a change the room never got).
 */
export function reviewDecisionIn(shadow: Y.Doc, update: Uint8Array): string | null {
	const points = shadow.getMap<unknown>('points');
	let decision: string | null = null;
	const inspect = (tr: Y.Transaction) => {
		for (const [type, keys] of tr.changed) {
			if ((type as unknown) === points) {
				// A point added (or replaced) whole: its status must not be a decision.
				for (const key of keys) {
					const m = points.get(key as string);
					const status = m instanceof Y.Map ? m.get('status') : undefined;
					if (typeof status === 'string' && REVIEW_DECISIONS.has(status)) decision = status;
				}
			} else if (type instanceof Y.Map && type.parent === points && keys.has('status')) {
				const status = type.get('status');
				if (typeof status === 'string' && REVIEW_DECISIONS.has(status)) decision = status;
			}
		}
	};
	shadow.on('afterTransaction', inspect);
	try {
		Y.applyUpdate(shadow, update);
	} finally {
		shadow.off('afterTransaction', inspect);
	}
	return decision;
}

/** Brings a shadow copy up to date with the room's document (only what it lacks). */
export function catchUpShadow(shadow: Y.Doc, doc: Y.Doc): void {
	Y.applyUpdate(shadow, Y.encodeStateAsUpdate(doc, Y.encodeStateVector(shadow)));
}
