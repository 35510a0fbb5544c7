// Hook "authenticate": the handshake has already tied the socket to a signed-in member
// (realtime.ts); on join the board-access policy (access.ts → src/lib/survey/board-access.ts)
// says whether the member may open the board and whether read-only. Then the room is loaded,
// the member added, and the first frames sent: the server's state vector and who is there.
import type { Socket } from 'socket.io';
import { joinRequestSchema } from '../../../schemas/collab';
import { EVENT_MESSAGE, roomOf, type JoinReply } from '../../../board/sync/protocol';
import { syncStep1Frame } from '../../../board/sync/frames';
import type { CollabContext } from '../context';
import { closeSocket, who } from '../context';
import { SYNC_REQUEST_BURST, SYNC_REQUESTS_PER_SECOND, type RoomMember } from '../room';
import { loadBoardAccess, type BoardViewer } from '../access';
import { TokenBucket } from '../rate-limit';
import type { ByteBucket } from '../budget';
import { presenceFrameFor } from '../presence';
import { openRoom } from './load';
import { cancelUnload, scheduleUnload } from './unload';

export async function join(ctx: CollabContext, socket: Socket, bytes: ByteBucket, payload: unknown, ack: unknown) {
	if (typeof ack !== 'function') return closeSocket(ctx, socket, 'join without an acknowledgement callback');
	const reply = ack as (r: JoinReply) => void;
	const parsed = joinRequestSchema.safeParse(payload);
	if (!parsed.success) {
		reply({ ok: false, error: 'A board id is needed to join.' });
		return closeSocket(ctx, socket, 'malformed join');
	}
	if (socket.data.boardId) return reply({ ok: false, error: 'This connection is already on a board.' });
	const viewer = socket.data.viewer as BoardViewer;
	const { boardId } = parsed.data;
	try {
		const access = await loadBoardAccess(ctx.db, viewer, boardId);
		if (!access) {
			ctx.log.warn(`[collab] ${who(socket)} asked for board ${boardId}: not found in the organisation`);
			return reply({ ok: false, error: 'Board not found.' });
		}
		if (!socket.connected || ctx.closed) return;
		const room = await openRoom(ctx, boardId);
		if (!socket.connected) {
			if (room.members.size === 0) scheduleUnload(ctx, room);
			return;
		}
		cancelUnload(room);
		socket.data.boardId = boardId;
		const member: RoomMember = {
			socket,
			viewer,
			readOnly: access.readOnly,
			reason: access.reason,
			clientIds: new Set(),
			bytes,
			syncRequests: new TokenBucket(SYNC_REQUESTS_PER_SECOND, SYNC_REQUEST_BURST),
			inFlight: Promise.resolve(),
			heldBack: false
		};
		room.members.set(socket.id, member);
		socket.join(roomOf(boardId));
		reply({
			ok: true,
			readOnly: access.readOnly,
			reason: access.reason,
			user: { id: viewer.userId, name: viewer.name },
			maxUpdateBytes: ctx.options.maxUpdateBytes
		});
		socket.emit(EVENT_MESSAGE, syncStep1Frame(room.doc));
		const presence = presenceFrameFor(room);
		if (presence) socket.emit(EVENT_MESSAGE, presence);
	} catch (e) {
		ctx.log.error(`[collab] join of board ${boardId} by ${who(socket)} failed: ${(e as Error).message}`);
		// Whatever failed (most likely the database), it may work in a moment.
		reply({ ok: false, error: 'The board could not be opened just now. Trying again…', retry: true });
	}
}
