// One frame from a joined socket through the pipeline: parse (frames.ts; malformed → the socket
// is closed) → for a sync request, answer with what the socket lacks; for an update, check →
// store (shown to the peers at once, committed apart) → acknowledge after the commit; for presence, sanitise and relay (presence.ts).
import type { Socket } from 'socket.io';
import { EVENT_MESSAGE } from '../../../board/sync/protocol';
import { Malformed, parseFrame, syncStep2Frame } from '../../../board/sync/frames';
import type { CollabContext } from '../context';
import { closeSocket, who } from '../context';
import { SYNC_REQUEST_BURST, SYNC_REQUESTS_PER_SECOND, type BoardRoom, type RoomMember } from '../room';
import { receivePresence } from '../presence';
import { checkRights, checkUpdate } from './check';
import { storeUpdate } from './store';
import { refused, storageAway, stored, type Reply } from './acknowledge';

/**
 * Runs `task` after the member's earlier updates were checked and handed to the writer, whatever
 * became of them: a client-id lookup in the database must not let a later update overtake an
 * earlier one (the client takes an acknowledgement as covering everything it sent before).
 */
function inOrder(member: RoomMember, task: () => Promise<void>): Promise<void> {
	const run = member.inFlight.then(task);
	member.inFlight = run.catch(() => {});
	return run;
}

/**
 * Everything that can be wrong with a message is found synchronously, before anything is stored
 * or sent: a malformed message closes the socket before its next message is read.
 */
function handle(
	ctx: CollabContext,
	room: BoardRoom,
	member: RoomMember,
	bytes: Uint8Array,
	reply: Reply,
	failed: (e: unknown) => void
): Promise<void> | void {
	const frame = parseFrame(bytes);
	switch (frame.kind) {
		case 'step1': {
			// Each one costs an encoding of the board: the provider sends one per (re)join or rollback.
			if (!member.syncRequests.take()) {
				return closeSocket(
					ctx,
					member.socket,
					`more than ${SYNC_REQUESTS_PER_SECOND} sync requests per second (burst ${SYNC_REQUEST_BURST})`
				);
			}
			member.socket.emit(EVENT_MESSAGE, syncStep2Frame(room.doc, frame.stateVector));
			return reply(stored());
		}
		case 'update': {
			const checked = checkUpdate(ctx, room, member, frame.update);
			const update = frame.update;
			// Each update waits for the member's earlier ones to be checked and handed to the writer.
			return inOrder(member, async () => {
				if (!checked.ok) {
					if ('ack' in checked) return reply(checked.ack);
					// Already in the room, which shows updates before they are committed: "stored"
					// once everything the board took before this is (the writer's order per board).
					void ctx.writer.stored(room.id).then(
						() => reply(stored()),
						() => reply(storageAway())
					);
					return;
				}
				const verdict = await checkRights(ctx, room, member, update, checked.decoded);
				if (typeof verdict === 'string') return reply(refused(verdict));
				// Handed to the writer now, in order (it commits in that order); the commit is
				// awaited apart from the queue, so one member's updates still share group commits.
				void storeUpdate(ctx, room, member, update, reply, verdict.shadowGen).catch(failed);
			});
		}
		case 'awareness': {
			// Presence is passing news: over the budget it is dropped, not kept.
			receivePresence(room, member, frame.update);
			return reply(stored());
		}
	}
}

/** Runs one message of a socket; whatever fails closes that socket only. */
export function receive(ctx: CollabContext, socket: Socket, room: BoardRoom, member: RoomMember, bytes: Uint8Array, reply: Reply) {
	const failed = (e: unknown) => {
		if (e instanceof Malformed) return closeSocket(ctx, socket, `malformed message: ${e.message}`);
		ctx.log.error(`[collab] message from ${who(socket)} failed:`, e);
		closeSocket(ctx, socket, `message could not be handled: ${(e as Error)?.message ?? String(e)}`);
	};
	try {
		handle(ctx, room, member, bytes, reply, failed)?.catch(failed);
	} catch (e) {
		failed(e);
	}
}
