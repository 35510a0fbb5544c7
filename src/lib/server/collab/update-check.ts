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

/** Brings a shadow copy up to date with the room's document (only what it lacks). */
export function catchUpShadow(shadow: Y.Doc, doc: Y.Doc): void {
	Y.applyUpdate(shadow, Y.encodeStateAsUpdate(doc, Y.encodeStateVector(shadow)));
}
