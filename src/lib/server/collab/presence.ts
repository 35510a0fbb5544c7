// Presence (who is on the board, their cursor and selection): a socket may speak only for its
// own client ids and under its signed-in name; what changes goes to the room here and, when it
// came from a socket here, to the other processes, which answer a newly opened board with the
// presence they hold.
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { applyAwarenessUpdate, encodeAwarenessUpdate } from 'y-protocols/awareness';
import { awarenessStateSchema } from '../../schemas/collab';
import { EVENT_MESSAGE, roomOf } from '../../board/sync/protocol';
import { Malformed, assertConsumed, awarenessFrame } from '../../board/sync/frames';
import type { CollabContext } from './context';
import { ORIGIN_LEAVE, ORIGIN_RELAY, type BoardRoom, type RoomMember } from './room';
import { RELAY_AWARENESS, RELAY_PRESENCE_REQUEST } from './cluster';

/** At most this many client ids per socket and this much JSON per state. */
const MAX_AWARENESS_CLIENTS = 4;
const MAX_AWARENESS_STATE_CHARS = 16_000;

/** Sends every presence change of the room to its sockets (and, if it is news, to the other processes). */
export function wirePresence(ctx: CollabContext, room: BoardRoom) {
	room.awareness.on('update', ({ added, updated, removed }: { added: number[]; updated: number[]; removed: number[] }, origin: unknown) => {
		const changed = added.concat(updated, removed);
		if (changed.length === 0 || room.state === 'gone') return;
		const update = encodeAwarenessUpdate(room.awareness, changed);
		const local = ctx.io.local.to(roomOf(room.id));
		(typeof origin === 'string' && room.members.has(origin) ? local.except(origin) : local).emit(EVENT_MESSAGE, awarenessFrame(update));
		// What a socket here did is news for the other processes; their own relays and
		// time-outs are not.
		if (room.members.has(origin as string) || origin === ORIGIN_LEAVE) {
			ctx.cluster.toOthers(() => ctx.io.serverSideEmit(RELAY_AWARENESS, room.id, Buffer.from(update).toString('base64')));
		}
	});
}

/** A socket's presence update, checked and applied; over the byte budget it is dropped. */
export function receivePresence(room: BoardRoom, member: RoomMember, bytes: Uint8Array) {
	if (member.bytes.waitMs() > 0) return;
	member.bytes.take(bytes.byteLength);
	let clean: Uint8Array;
	try {
		clean = sanitisePresence(room, member, bytes);
	} catch (e) {
		throw e instanceof Malformed ? e : new Malformed(`presence update does not decode: ${(e as Error).message}`);
	}
	applyAwarenessUpdate(room.awareness, clean, member.socket.id);
}

/** The presence of a joining socket: everyone already on the board. */
export function presenceFrameFor(room: BoardRoom): Uint8Array | null {
	if (room.awareness.states.size === 0) return null;
	return awarenessFrame(encodeAwarenessUpdate(room.awareness, [...room.awareness.states.keys()]));
}

/** Checks and rewrites a socket's presence update: only its own client ids, its own name. */
function sanitisePresence(room: BoardRoom, member: RoomMember, bytes: Uint8Array): Uint8Array {
	const d = decoding.createDecoder(bytes);
	const n = decoding.readVarUint(d);
	if (n > MAX_AWARENESS_CLIENTS) throw new Malformed(`presence update for ${n} clients`);
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, n);
	for (let i = 0; i < n; i++) {
		const clientId = decoding.readVarUint(d);
		const clock = decoding.readVarUint(d);
		const json = decoding.readVarString(d);
		if (json.length > MAX_AWARENESS_STATE_CHARS) throw new Malformed('presence state too large');
		const owner = room.ownerOfPresence(clientId);
		if (owner && owner !== member.socket.id) {
			// The same member reconnecting before the old connection timed out takes it over;
			// anyone else speaking for that client is forging presence.
			const previous = room.members.get(owner)!;
			if (previous.viewer.userId !== member.viewer.userId) throw new Malformed(`presence for client ${clientId} of another member`);
			previous.clientIds.delete(clientId);
		}
		if (!member.clientIds.has(clientId)) {
			if (member.clientIds.size >= MAX_AWARENESS_CLIENTS) throw new Malformed('too many presence client ids');
			member.clientIds.add(clientId);
		}
		let state: unknown;
		try {
			state = JSON.parse(json);
		} catch {
			throw new Malformed('presence state is not JSON');
		}
		if (state !== null) {
			const parsed = awarenessStateSchema.safeParse(state);
			if (!parsed.success) throw new Malformed(`presence state rejected: ${parsed.error.issues[0]?.message ?? 'invalid'}`);
			state = {
				...parsed.data,
				user: { ...(parsed.data.user ?? {}), name: member.viewer.name, id: member.viewer.userId }
			};
		}
		encoding.writeVarUint(e, clientId);
		encoding.writeVarUint(e, clock);
		encoding.writeVarString(e, JSON.stringify(state));
	}
	assertConsumed(d);
	return encoding.toUint8Array(e);
}

/** Presence between the processes (only when the live board runs as a cluster). */
export function relayPresence(ctx: CollabContext) {
	const { io, rooms } = ctx;
	io.on(RELAY_PRESENCE_REQUEST, (boardId: unknown) => {
		if (typeof boardId !== 'string') return;
		ctx.cluster.heard();
		const room = rooms.get(boardId);
		if (!room || room.state !== 'ready') return;
		const ids = [...room.members.values()].flatMap((m) => [...m.clientIds]).filter((id) => room.awareness.states.has(id));
		if (ids.length) io.serverSideEmit(RELAY_AWARENESS, boardId, Buffer.from(encodeAwarenessUpdate(room.awareness, ids)).toString('base64'));
	});
	io.on(RELAY_AWARENESS, (boardId: unknown, b64: unknown) => {
		if (typeof boardId !== 'string' || typeof b64 !== 'string') return;
		ctx.cluster.heard();
		const room = rooms.get(boardId);
		if (!room || room.state !== 'ready') return;
		try {
			applyAwarenessUpdate(room.awareness, Buffer.from(b64, 'base64'), ORIGIN_RELAY);
		} catch (e) {
			ctx.log.error(`[collab] relayed presence for board ${boardId} did not apply: ${(e as Error).message}`);
		}
	});
}
