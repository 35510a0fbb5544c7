// Board state changes (approval, freezing, reopening, role changes) announced by any process
// (notify.ts): every open board of this process re-checks its members' access and tells each
// socket when it became read-only or writable, or closes it when access is gone.
import { EVENT_STATE, type BoardStateEvent } from '../../board/sync/protocol';
import type { CollabContext } from './context';
import { closeSocket } from './context';
import type { RoomMember } from './room';
import { loadBoardAccess } from './access';
import { listenForever, type Listening } from './pg-listen';
import { BOARD_CHANNEL } from './notify';

export function setReadOnly(member: RoomMember, readOnly: boolean, reason: string | null) {
	if (member.readOnly === readOnly && member.reason === reason) return;
	member.readOnly = readOnly;
	member.reason = reason;
	const ev: BoardStateEvent = { readOnly, reason };
	member.socket.emit(EVENT_STATE, ev);
}

async function refreshRoom(ctx: CollabContext, boardId: string) {
	const room = ctx.rooms.get(boardId);
	if (!room || room.state !== 'ready') return;
	for (const member of [...room.members.values()]) {
		try {
			const access = await loadBoardAccess(ctx.db, member.viewer, boardId);
			if (!access) closeSocket(ctx, member.socket, 'access to the board was withdrawn');
			else setReadOnly(member, access.readOnly, access.reason);
		} catch (e) {
			ctx.log.error(`[collab] refreshing board ${boardId} failed: ${(e as Error).message}`);
		}
	}
}

/**
 * Listens for board state changes from any process. The connection is re-opened whenever it is
 * lost; every open room is re-checked then, for whatever was announced meanwhile.
 */
export function listenForBoardState(ctx: CollabContext): Listening {
	return listenForever(ctx.pool, BOARD_CHANNEL, {
		part: 'board-state listener',
		onNotify: (boardId) => void refreshRoom(ctx, boardId),
		onConnected: () => {
			for (const id of ctx.rooms.keys()) void refreshRoom(ctx, id);
		},
		log: ctx.log
	});
}
