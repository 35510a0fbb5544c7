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

/** Brings a shadow copy up to date with the room's document (only what it lacks). */
export function catchUpShadow(shadow: Y.Doc, doc: Y.Doc): void {
	Y.applyUpdate(shadow, Y.encodeStateAsUpdate(doc, Y.encodeStateVector(shadow)));
}
