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
 * True when applying the update would change nothing in `doc` (e.g. a read-only member's sync
 * step 2 after a reconnect): the board policy's own test, so both agree.
 */
export { isCoveredBy } from '../../board/model/policy';

/**
 * True when the update continues a client's changes from a point the document has not reached
 * (it builds on an update the document lacks): Yjs would keep it pending, not apply it.
 */
export function buildsOnMissing(doc: Y.Doc, d: DecodedUpdate): boolean {
	// How far each client's changes reach: the document's state, then each struct of the update.
	const reach = new Map<number, number>();
	for (const s of d.structs) {
		if (s instanceof Y.Skip) continue;
		const client = s.id.client;
		const known = Math.max(reach.get(client) ?? 0, Y.getState(doc.store, client));
		if (s.id.clock > known) return true;
		reach.set(client, Math.max(known, s.id.clock + s.length));
	}
	return false;
}

/** Brings a shadow copy up to date with the room's document (only what it lacks). */
export function catchUpShadow(shadow: Y.Doc, doc: Y.Doc): void {
	Y.applyUpdate(shadow, Y.encodeStateAsUpdate(doc, Y.encodeStateVector(shadow)));
}
