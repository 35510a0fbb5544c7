// Hook "acknowledge": every answer the sender of an update can get (protocol.ts MessageAck), in
// words for the person: stored, refused for good (the client rolls back and keeps the work in
// its tray), or not stored for now (the client keeps it and sends it again after the wait).
import type { MessageAck } from '../../../board/sync/protocol';
import type { CollabContext } from '../context';
import { who } from '../context';
import type { BoardRoom, RoomMember } from '../room';

export type Reply = (a: MessageAck) => void;

/** Wait suggested to a sender while the database is away. */
export const RETRY_AFTER_OUTAGE_MS = 2000;

export const stored = (): MessageAck => ({ ok: true });

export function refused(reason: string, readOnly = false): MessageAck {
	return { ok: false, refused: reason, readOnly };
}

export function storageAway(): MessageAck {
	return {
		ok: false,
		retry: 'The server cannot save changes just now. They are kept on this device and sent again automatically.',
		retryAfterMs: RETRY_AFTER_OUTAGE_MS
	};
}

const overBudgetLogged = new WeakMap<CollabContext, Map<string, number>>();

/** The answer to an update over a byte budget; logged once per burst, not per message. */
export function overBudget(
	ctx: CollabContext,
	room: BoardRoom,
	member: RoomMember,
	whose: 'connection' | 'board',
	retryAfterMs: number
): MessageAck {
	let logged = overBudgetLogged.get(ctx);
	if (!logged) overBudgetLogged.set(ctx, (logged = new Map()));
	const now = Date.now();
	if (now - (logged.get(member.socket.id) ?? 0) > 10_000) {
		logged.set(member.socket.id, now);
		ctx.log.warn(`[collab] slowing ${who(member.socket)}: over the ${whose} byte budget (${room.id})`);
	}
	return {
		ok: false,
		retry:
			whose === 'connection'
				? 'Changes are arriving faster than the server takes them from one connection. They are kept on this device and sent again in a moment.'
				: 'This board is taking more changes than the server accepts per second. Yours are kept on this device and sent again in a moment.',
		retryAfterMs
	};
}

/** A socket left: forget when its over-budget warning was last logged. */
export function forgetSocket(ctx: CollabContext, socketId: string) {
	overBudgetLogged.get(ctx)?.delete(socketId);
}
