// Hook "broadcast": a checked update goes into the room's document and out to its sockets here
// before it is stored (store.ts awaits the commit apart and acknowledges the sender after it);
// once stored, through the socket.io adapter, to the same board in the other processes. Updates
// relayed from them come in the same way (once each, by log sequence number).
import * as Y from 'yjs';
import { EVENT_MESSAGE, roomOf } from '../../../board/sync/protocol';
import { syncUpdateFrame } from '../../../board/sync/frames';
import type { CollabContext } from '../context';
import { ORIGIN_CHECKED, ORIGIN_RELAY, ORIGIN_STORAGE, type BoardRoom } from '../room';
import { RELAY_UPDATE } from '../cluster';

/**
 * A checked update, before it is stored: into the document and out to the room here (but the
 * sender). The other processes get it once it is stored (relayStored), with its log seq.
 */
export function applyChecked(ctx: CollabContext, room: BoardRoom, update: Uint8Array, exceptSocket: string | null, inShadow = true) {
	room.size.grew(update.byteLength);
	try {
		Y.applyUpdate(room.doc, update, inShadow ? ORIGIN_CHECKED : ORIGIN_STORAGE);
	} catch (e) {
		ctx.log.error(`[collab] board ${room.id}: checked update did not apply: ${(e as Error).message}`);
	}
	const local = ctx.io.local.to(roomOf(room.id));
	(exceptSocket ? local.except(exceptSocket) : local).emit(EVENT_MESSAGE, syncUpdateFrame(update));
}

/** A stored update to the same board in the other processes. */
export function relayStored(ctx: CollabContext, room: BoardRoom, seq: string, update: Uint8Array) {
	// Base64 in JSON goes through NOTIFY directly; raw bytes would take the adapter's
	// attachment-table path (an INSERT and a SELECT per message). Alone, nothing is sent:
	// a process that starts announces itself before it takes connections, and the log
	// re-read (catch-up.ts) covers the moment before the others have heard of it.
	ctx.cluster.toOthers(() => ctx.io.serverSideEmit(RELAY_UPDATE, room.id, seq, Buffer.from(update).toString('base64')));
}

/** After storage (an update not shown before): into the document, out to the room here and elsewhere. */
export function publishStored(ctx: CollabContext, room: BoardRoom, seq: string, update: Uint8Array, exceptSocket: string | null) {
	room.seen.add(seq);
	applyChecked(ctx, room, update, exceptSocket, false);
	relayStored(ctx, room, seq, update);
}

/** An update another process stored: into the document and out to the room here. */
export function applyRelayed(ctx: CollabContext, room: BoardRoom, seq: string, update: Uint8Array) {
	if (room.seen.has(seq)) return;
	room.seen.add(seq);
	room.size.grew(update.byteLength);
	try {
		Y.applyUpdate(room.doc, update, ORIGIN_RELAY);
	} catch (e) {
		ctx.log.error(`[collab] board ${room.id}: relayed update ${seq} did not apply: ${(e as Error).message}`);
		return;
	}
	ctx.io.local.to(roomOf(room.id)).emit(EVENT_MESSAGE, syncUpdateFrame(update));
}

/** Takes the other processes' stored updates (only when the live board runs as a cluster). */
export function listenForRelayedUpdates(ctx: CollabContext) {
	ctx.io.on(RELAY_UPDATE, (boardId: unknown, seq: unknown, b64: unknown) => {
		if (typeof boardId !== 'string' || typeof seq !== 'string' || typeof b64 !== 'string') return;
		ctx.cluster.heard();
		const room = ctx.rooms.get(boardId);
		if (!room) return;
		const update = Buffer.from(b64, 'base64');
		if (room.state === 'loading') room.early.push({ seq, update });
		else if (room.state === 'ready') applyRelayed(ctx, room, seq, update);
	});
}
