// Hook "store": a checked update goes to the room and its peers at once (broadcast.ts) and is
// appended to the board's log through the group-committing writer (writer.ts; one SQL statement
// that also checks, at that moment, the session, the board and the member's role against the
// survey's state). The sender is acknowledged only once it is committed: "stored" means on disk.
//
// Peers may see an update before it is committed. If the commit then fails (database away), the
// sender is told "not now" and keeps the update, the peers hold it, and the writer keeps it too
// and stores it when the database answers; Yjs converges whatever order copies arrive in. If the
// stored state refuses it for good (the member's access ended between the check and the commit),
// the room is dropped and its sockets reconnect to a copy read from storage (resetRoom).
import type { CollabContext } from '../context';
import { closeSocket, who } from '../context';
import type { BoardRoom, RoomMember } from '../room';
import { loadBoardAccess, type BoardAccess } from '../access';
import { StorageUnavailable } from '../writer';
import { isConnectionError } from '../../db-health';
import { setReadOnly } from '../board-state';
import { applyChecked, publishStored, relayStored } from './broadcast';
import { noteStored, resetRoom } from './unload';
import { refused, storageAway, stored, type Reply } from './acknowledge';

/** `shadowGen`: the shadow copy the board policy tried the update on (room.ts), if any. */
export async function storeUpdate(
	ctx: CollabContext,
	room: BoardRoom,
	member: RoomMember,
	update: Uint8Array,
	reply: Reply,
	shadowGen: number | null
) {
	const item = {
		boardId: room.id,
		organisationId: member.viewer.organisationId,
		userId: member.viewer.userId,
		sessionId: member.viewer.sessionId,
		update
	};
	// Read-only members are refused by the store's own check (or become writable again there):
	// nothing of theirs is shown to anyone before it is stored.
	const early = !member.readOnly;
	if (early) {
		if (!ctx.writer.accepting(room.id)) {
			// Earlier updates of this board wait for the database: take nothing more meanwhile.
			room.dropShadow();
			return reply(storageAway());
		}
		// Checked: into the document and out to the peers now, in the order the writer gets it.
		applyChecked(ctx, room, update, member.socket.id, shadowGen !== null && shadowGen === room.shadowGen && room.shadow !== null);
	}
	let seq: string | null;
	let access: BoardAccess | null | undefined;
	try {
		seq = early ? await ctx.writer.enqueue(item) : null;
		if (seq === null && !early) {
			// Known read-only: ask afresh why, in case the member's role or the survey changed since the join.
			access = await loadBoardAccess(ctx.db, member.viewer, room.id);
			if (access && !access.readOnly && member.readOnly) {
				setReadOnly(member, false, null);
				seq = await ctx.writer.enqueue(item);
				if (seq !== null && room.state === 'ready') publishStored(ctx, room, seq, update, member.socket.id);
			}
		} else if (seq === null) {
			access = await loadBoardAccess(ctx.db, member.viewer, room.id).catch(() => undefined);
		}
	} catch (e) {
		if (!(e instanceof StorageUnavailable) && !isConnectionError(e)) throw e;
		// Not stored yet, not refused: the sender keeps the change and sends it again (the
		// writer keeps it as well when the room already holds it).
		if (!early) room.dropShadow();
		ctx.log.warn(`[collab] could not store an update from ${who(member.socket)} yet: ${(e as Error).message}`);
		return reply(storageAway());
	}
	if (seq === null) {
		room.dropShadow();
		const reason = access?.reason ?? 'You no longer have access to this board.';
		ctx.log.warn(`[collab] refused an update from ${who(member.socket)}: ${reason}`);
		setReadOnly(member, true, reason);
		reply(refused(reason, true));
		if (!access) closeSocket(ctx, member.socket, 'access to the board was withdrawn');
		// The room (and its peers) already hold the refused change: start them again from storage.
		if (early) resetRoom(ctx, room, 'a change shown here was not accepted by the server; reloading the board');
		return;
	}
	if (early) {
		room.seen.add(seq);
		relayStored(ctx, room, seq, update);
	}
	reply(stored());
	if (room.state === 'ready') noteStored(ctx, room);
}
