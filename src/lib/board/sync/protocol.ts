// The wire format of the live board, shared by the server (src/lib/server/collab) and the one
// sync client (provider.ts). socket.io carries y-protocols messages unchanged, framed as
// y-websocket frames them: a varUint message type (sync or awareness), then the message.
//
//   client → server  'board:join'  { boardId }                 ack: JoinReply
//   both ways        'y'           Uint8Array (y-protocols)    ack (client → server): MessageAck
//   server → client  'board:state' { readOnly, reason }         the board became read-only or writable
//   server → client  'board:closed' { reason }                  sent just before the server closes the socket
//
// The server answers every message it receives from the client with an ack once it is done with
// it; for an update that means "stored", refused for good (`refused`: the client rolls back), or
// not stored for now (`retry`: the database is away or the sender is over its byte budget; the
// client keeps the change and sends it again after `retryAfterMs`, merged with what followed).

export const EVENT_JOIN = 'board:join';
export const EVENT_MESSAGE = 'y';
export const EVENT_STATE = 'board:state';
export const EVENT_CLOSED = 'board:closed';

/** y-websocket's outer message types. */
export const MESSAGE_SYNC = 0;
export const MESSAGE_AWARENESS = 1;

export type JoinReply =
	| {
			ok: true;
			readOnly: boolean;
			reason: string | null;
			user: { id: string; name: string };
			/** The largest update the server stores; held-back changes are sent again in pieces under it. */
			maxUpdateBytes?: number;
	  }
	/** `retry`: the board cannot be opened just now (the database is away); try again later. */
	| { ok: false; error: string; retry?: boolean };

export type MessageAck =
	{ ok: true } | { ok: false; refused: string; readOnly: boolean } | { ok: false; retry: string; retryAfterMs: number };

/** Handshake refusals that are not final carry this in the error's `data`. */
export interface HandshakeErrorData {
	retry: boolean;
}

export interface BoardStateEvent {
	readOnly: boolean;
	reason: string | null;
}

/** Room name of a board in socket.io. */
export function roomOf(boardId: string) {
	return `board:${boardId}`;
}
