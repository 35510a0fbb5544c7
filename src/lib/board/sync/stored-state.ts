// A board's stored state as the board page fetches it before the live sync has joined
// (GET /surveys/{surveyId}/boards/{boardId}/state): the snapshot and each row of the log, as
// stored, one after the other, each as a varUint length and its bytes (lib0 encoding). The
// client applies them in order, skipping one that does not apply, as the server does when it
// opens a board (server/db/board-document.ts).
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';

export const STORED_STATE_TYPE = 'application/vnd.spotface.board-state';

/** The path of a board's stored state, beside its page. */
export function storedStatePath(surveyId: string, boardId: string): string {
	return `/surveys/${surveyId}/boards/${boardId}/state`;
}

export function encodeStoredState(updates: readonly Uint8Array[]): Uint8Array {
	const e = encoding.createEncoder();
	for (const u of updates) encoding.writeVarUint8Array(e, u);
	return encoding.toUint8Array(e);
}

/** The updates in a stored state; throws on a body that is not one. */
export function decodeStoredState(bytes: Uint8Array): Uint8Array[] {
	const d = decoding.createDecoder(bytes);
	const out: Uint8Array[] = [];
	while (decoding.hasContent(d)) {
		const len = decoding.readVarUint(d);
		if (len > bytes.byteLength - d.pos) throw new RangeError('The board state is cut short.');
		out.push(decoding.readUint8Array(d, len));
	}
	return out;
}
