// Hook "store": appends a checked update to the board's log through the group-committing writer
// (writer.ts; one SQL statement that also checks, at that moment, the session, the board and the
// member's role against the survey's state). Stored → broadcast and acknowledge; refused by the
// stored state → the member becomes read-only with the reason; database away → "retry".
import type { CollabContext } from '../context';
import { closeSocket, who } from '../context';
import type { BoardRoom, RoomMember } from '../room';
import { loadBoardAccess, type BoardAccess } from '../access';
import { StorageUnavailable } from '../writer';
import { isConnectionError } from '../../db-health';
import { setReadOnly } from '../board-state';
import { publishStored } from './broadcast';
import { noteStored } from './unload';
import { refused, storageAway, stored, type Reply } from './acknowledge';

export async function storeUpdate(ctx: CollabContext, room: BoardRoom, member: RoomMember, update: Uint8Array, reply: Reply) {
	const item = {
		boardId: room.id,
		organisationId: member.viewer.organisationId,
		userId: member.viewer.userId,
		sessionId: member.viewer.sessionId,
		update
	};
	let seq: string | null;
	let access: BoardAccess | null | undefined;
	try {
		seq = member.readOnly ? null : await ctx.writer.enqueue(item);
		if (seq === null) {
			// Refused by the stored state (or known read-only): ask afresh why, in case the
			// member's role or the survey changed since the join.
			access = await loadBoardAccess(ctx.db, member.viewer, room.id);
			if (access && !access.readOnly && member.readOnly) {
				setReadOnly(member, false, null);
				seq = await ctx.writer.enqueue(item);
			}
		}
	} catch (e) {
		if (!(e instanceof StorageUnavailable) && !isConnectionError(e)) throw e;
		// Not stored, not refused: the sender keeps the change and sends it again. The shadow
		// copy may hold it already; it is rebuilt from the room's document next time.
		room.dropShadow();
		ctx.log.warn(`[collab] could not store an update from ${who(member.socket)}: ${(e as Error).message}`);
		return reply(storageAway());
	}
	if (seq === null) {
		room.dropShadow();
		const reason = access?.reason ?? 'You no longer have access to this board.';
		ctx.log.warn(`[collab] refused an update from ${who(member.socket)}: ${reason}`);
		setReadOnly(member, true, reason);
		reply(refused(reason, true));
		if (!access) closeSocket(ctx, member.socket, 'access to the board was withdrawn');
		return;
	}
	if (room.state === 'gone') return reply(stored());
	publishStored(ctx, room, seq, update, member.socket.id);
	reply(stored());
	noteStored(ctx, room);
}
