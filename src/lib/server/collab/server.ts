// The live board on socket.io, in the hook style: authenticate (the handshake, then the board
// access on join), load (snapshot + log into a Y.Doc on first join), store (each update is
// checked and appended before anyone sees it), unload (compact and drop the document once the
// last connection has been gone for a grace period).
//
// Order for an update: decode → check permission and append (one SQL statement, group-committed)
// → apply to the in-memory document → send to the other sockets of the room, here and, through
// the socket.io PostgreSQL adapter, in the other processes → acknowledge to the sender.
import type { Server, Socket } from 'socket.io';
import type pg from 'pg';
import * as Y from 'yjs';
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import { Awareness, applyAwarenessUpdate, encodeAwarenessUpdate, removeAwarenessStates } from 'y-protocols/awareness';
import * as syncProtocol from 'y-protocols/sync';
import type { DB } from '../db/index';
import { awarenessStateSchema, binaryMessageSchema, joinRequestSchema } from '../../schemas/collab';
import {
	EVENT_CLOSED,
	EVENT_JOIN,
	EVENT_MESSAGE,
	EVENT_STATE,
	MESSAGE_AWARENESS,
	MESSAGE_SYNC,
	roomOf,
	type BoardStateEvent,
	type JoinReply,
	type MessageAck
} from '../../board/sync/protocol';
import { loadBoardAccess, type BoardViewer } from './access';
import { compact, loadInto, readMissing } from './persistence';
import { StorageUnavailable, UpdateWriter } from './writer';
import { TokenBucket } from './rate-limit';
import { ByteBucket, DocumentSize, kib, spend } from './budget';
import { listenForever } from './pg-listen';
import { isConnectionError } from '../db-health';
import { catchUpShadow, decodeUpdateStrict, isCoveredBy, isEmptyUpdate } from './update-check';
import { checkBoardChange, cloneDoc } from '../../board/model/policy';
import { refusalMessage } from '../../board/sync/policy-check';
import { ensureOwnership, structClientIds } from './client-ids';
import { can } from '../auth/guard';
import type { CollabOptions } from './config';
import { BOARD_CHANNEL } from './notify';

const RELAY_UPDATE = 'collab:update';
const RELAY_AWARENESS = 'collab:awareness';
/** A process that has just opened a board asks the others for the presence they hold. */
const RELAY_PRESENCE_REQUEST = 'collab:presence?';
const ORIGIN_STORAGE = 'storage';
const ORIGIN_RELAY = 'relay';
const ORIGIN_CATCH_UP = 'catch-up';
const ORIGIN_LEAVE = 'leave';
/** Awareness: at most this many client ids per socket and this much JSON per state. */
const MAX_AWARENESS_CLIENTS = 4;
const MAX_AWARENESS_STATE_CHARS = 16_000;
/** Sync requests (step 1) a socket may send: each costs the server an encoding of the board. */
const SYNC_REQUESTS_PER_SECOND = 2;
const SYNC_REQUEST_BURST = 10;
/** Wait suggested to a sender while the database is away. */
const RETRY_AFTER_OUTAGE_MS = 2000;

interface RoomMember {
	socket: Socket;
	viewer: BoardViewer;
	readOnly: boolean;
	reason: string | null;
	clientIds: Set<number>;
	/** Bytes of updates and presence (budget.ts). */
	bytes: ByteBucket;
	syncRequests: TokenBucket;
	/**
	 * The socket's updates are checked and handed to the writer one after another, in the order
	 * they came: a client-id lookup in the database must not let a later update overtake an
	 * earlier one (the sender takes an acknowledgement as covering everything before it).
	 */
	pending: Promise<void>;
}

class BoardRoom {
	readonly doc = new Y.Doc();
	readonly awareness = new Awareness(this.doc);
	readonly members = new Map<string, RoomMember>();
	/** Log rows this process has applied (stored here or relayed); pruned as snapshots pass them. */
	readonly seen = new Set<string>();
	snapshotSeq = '0';
	state: 'loading' | 'ready' | 'unloading' | 'gone' = 'loading';
	ready!: Promise<void>;
	unloaded: Promise<void> | null = null;
	unloadTimer: ReturnType<typeof setTimeout> | null = null;
	storedSinceCompaction = 0;
	compacting: Promise<void> | null = null;
	/** Relayed updates that arrive while the room is loading; applied once it is ready. */
	early: Array<{ seq: string; update: Uint8Array }> = [];
	/** A copy of the document to try updates on with the board policy before they are accepted. */
	shadow: Y.Doc | null = null;
	/** Who introduced which Yjs client id on this board (filled as ids are looked up or claimed). */
	readonly owners = new Map<number, string>();
	/** Bytes of updates all sockets of the board may send here (budget.ts). */
	bytes: ByteBucket;
	readonly size = new DocumentSize();

	constructor(
		readonly id: string,
		options: CollabOptions
	) {
		this.bytes = new ByteBucket(options.boardBytesPerSecond, options.boardByteBurst);
		// The server is not a participant: no presence of its own.
		this.awareness.setLocalState(null);
	}

	noteSnapshot(seq: string) {
		if (BigInt(seq) <= BigInt(this.snapshotSeq)) return;
		this.snapshotSeq = seq;
		const s = BigInt(seq);
		for (const x of this.seen) if (BigInt(x) <= s) this.seen.delete(x);
	}
}

export interface CollabDeps {
	io: Server;
	db: DB;
	/** A pool from which one client is kept to LISTEN for board state changes. */
	pool: pg.Pool;
	options: CollabOptions;
	log?: Pick<Console, 'info' | 'warn' | 'error'>;
}

export interface CollabServer {
	stats(): {
		rooms: number;
		sockets: number;
		pendingWrites: number;
		writer: UpdateWriter['stats'];
		/** Append + commit time per batch, recent p50/p99 (ms). */
		storeMs: { p50: number; p99: number } | null;
	};
	close(): Promise<void>;
}

function frame(type: number, payload: Uint8Array): Uint8Array {
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, type);
	encoding.writeVarUint8Array(e, payload);
	return encoding.toUint8Array(e);
}

function syncUpdateMessage(update: Uint8Array) {
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, MESSAGE_SYNC);
	syncProtocol.writeUpdate(e, update);
	return encoding.toUint8Array(e);
}

function syncStep1Message(doc: Y.Doc) {
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, MESSAGE_SYNC);
	syncProtocol.writeSyncStep1(e, doc);
	return encoding.toUint8Array(e);
}

function syncStep2Message(doc: Y.Doc, stateVector: Uint8Array) {
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, MESSAGE_SYNC);
	encoding.writeVarUint(e, syncProtocol.messageYjsSyncStep2);
	encoding.writeVarUint8Array(e, Y.encodeStateAsUpdate(doc, stateVector));
	return encoding.toUint8Array(e);
}

class Malformed extends Error {}

function assertConsumed(d: decoding.Decoder) {
	if (decoding.hasContent(d)) throw new Malformed('trailing bytes after the message');
}

type Frame = { kind: 'step1'; stateVector: Uint8Array } | { kind: 'update'; update: Uint8Array } | { kind: 'awareness'; update: Uint8Array };

/** Reads one y-protocols frame; anything short, long or unknown is Malformed. */
function parseFrame(bytes: Uint8Array): Frame {
	try {
		const d = decoding.createDecoder(bytes);
		const type = decoding.readVarUint(d);
		let frame: Frame;
		if (type === MESSAGE_SYNC) {
			const step = decoding.readVarUint(d);
			if (step === syncProtocol.messageYjsSyncStep1) {
				frame = { kind: 'step1', stateVector: decoding.readVarUint8Array(d) };
				Y.decodeStateVector(frame.stateVector);
			} else if (step === syncProtocol.messageYjsSyncStep2 || step === syncProtocol.messageYjsUpdate) {
				frame = { kind: 'update', update: decoding.readVarUint8Array(d) };
			} else throw new Malformed(`unknown sync step ${step}`);
		} else if (type === MESSAGE_AWARENESS) {
			frame = { kind: 'awareness', update: decoding.readVarUint8Array(d) };
		} else throw new Malformed(`unknown message type ${type}`);
		assertConsumed(d);
		return frame;
	} catch (e) {
		throw e instanceof Malformed ? e : new Malformed((e as Error).message);
	}
}

export function attachCollab({ io, db, pool, options, log = console }: CollabDeps): CollabServer {
	const rooms = new Map<string, BoardRoom>();
	const writer = new UpdateWriter(pool);
	const messageSchema = binaryMessageSchema(options.maxMessageBytes);
	let closed = false;

	/** Other server processes the adapter has heard from recently (its heartbeat). */
	function otherProcesses(): number {
		if (!options.cluster) return 0;
		const nodes = (io.of('/').adapter as unknown as { nodesMap?: Map<string, number> }).nodesMap;
		return nodes?.size ?? 0;
	}

	function who(socket: Socket) {
		const v = socket.data.viewer as BoardViewer | undefined;
		return `socket ${socket.id} (user ${v?.userId ?? '?'}${socket.data.boardId ? `, board ${socket.data.boardId}` : ''})`;
	}

	/** Closes one socket with a logged reason; the document and everyone else carry on. */
	function closeSocket(socket: Socket, reason: string) {
		if (!socket.connected) return;
		log.warn(`[collab] closing ${who(socket)}: ${reason}`);
		socket.emit(EVENT_CLOSED, { reason });
		socket.disconnect(true);
	}

	// ---- load / unload -------------------------------------------------------------------

	async function openRoom(boardId: string): Promise<BoardRoom> {
		for (;;) {
			const existing = rooms.get(boardId);
			if (existing) {
				if (existing.state === 'unloading' || existing.state === 'gone') {
					await existing.unloaded;
					if (rooms.get(boardId) === existing) rooms.delete(boardId);
					continue;
				}
				await existing.ready;
				return existing;
			}
			const room = new BoardRoom(boardId, options);
			rooms.set(boardId, room);
			wireAwareness(room);
			room.ready = (async () => {
				const started = performance.now();
				const loaded = await loadInto(db, boardId, room.doc, ORIGIN_STORAGE);
				if (!loaded) throw new Error(`board ${boardId} not found`);
				for (const s of loaded.seqs) room.seen.add(s);
				room.snapshotSeq = loaded.snapshotSeq;
				for (const { seq, update } of room.early.splice(0)) applyRelayed(room, seq, update);
				room.size.measure(room.doc);
				room.state = 'ready';
				if (otherProcesses() > 0) io.serverSideEmit(RELAY_PRESENCE_REQUEST, boardId);
				log.info(
					`[collab] loaded board ${boardId}: ${loaded.seqs.length} log row(s) over the snapshot in ${(performance.now() - started).toFixed(1)} ms`
				);
			})();
			try {
				await room.ready;
			} catch (e) {
				room.state = 'gone';
				room.unloaded = Promise.resolve();
				rooms.delete(boardId);
				room.shadow?.destroy();
				room.doc.destroy();
				throw e;
			}
			return room;
		}
	}

	function scheduleUnload(room: BoardRoom) {
		if (room.unloadTimer) clearTimeout(room.unloadTimer);
		room.unloadTimer = setTimeout(() => void unload(room), options.unloadGraceMs);
		room.unloadTimer.unref?.();
	}

	async function unload(room: BoardRoom) {
		room.unloadTimer = null;
		if (room.members.size > 0 || room.state !== 'ready') return;
		room.state = 'unloading';
		room.unloaded = (async () => {
			try {
				await room.compacting;
				await runCompaction(room);
			} finally {
				room.awareness.destroy();
				room.shadow?.destroy();
				room.doc.destroy();
				room.state = 'gone';
				if (rooms.get(room.id) === room) rooms.delete(room.id);
				log.info(`[collab] unloaded board ${room.id} (${rooms.size} open)`);
			}
		})();
		await room.unloaded;
	}

	async function runCompaction(room: BoardRoom) {
		try {
			const r = await compact(db, room.id);
			if (r && r.merged > 0) {
				room.noteSnapshot(r.snapshotSeq);
				log.info(`[collab] compacted board ${room.id}: ${r.merged} update(s) into a ${r.snapshotBytes}-byte snapshot`);
			}
		} catch (e) {
			// The log is intact; the next round tries again.
			log.error(`[collab] compacting board ${room.id} failed: ${(e as Error).message}`);
		}
	}

	function maybeCompact(room: BoardRoom) {
		if (room.storedSinceCompaction < options.compactEvery || room.compacting) return;
		room.storedSinceCompaction = 0;
		room.compacting = runCompaction(room).finally(() => {
			room.compacting = null;
		});
	}

	// ---- presence ------------------------------------------------------------------------

	function wireAwareness(room: BoardRoom) {
		room.awareness.on(
			'update',
			({ added, updated, removed }: { added: number[]; updated: number[]; removed: number[] }, origin: unknown) => {
				const changed = added.concat(updated, removed);
				if (changed.length === 0 || room.state === 'gone') return;
				const update = encodeAwarenessUpdate(room.awareness, changed);
				const message = frame(MESSAGE_AWARENESS, update);
				const local = io.local.to(roomOf(room.id));
				(typeof origin === 'string' && room.members.has(origin) ? local.except(origin) : local).emit(EVENT_MESSAGE, message);
				// What a socket here did is news for the other processes; their own relays and
				// time-outs are not.
				if (otherProcesses() > 0 && (room.members.has(origin as string) || origin === ORIGIN_LEAVE)) {
					io.serverSideEmit(RELAY_AWARENESS, room.id, Buffer.from(update).toString('base64'));
				}
			}
		);
	}

	/** Checks and rewrites a socket's presence update: only its own client ids, its own name. */
	function sanitiseAwareness(room: BoardRoom, member: RoomMember, bytes: Uint8Array): Uint8Array {
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
			const owner = ownerOf(room, clientId);
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

	function ownerOf(room: BoardRoom, clientId: number): string | null {
		for (const [id, m] of room.members) if (m.clientIds.has(clientId)) return id;
		return null;
	}

	// ---- updates -------------------------------------------------------------------------

	/** After storage: into the document, out to the room here and in the other processes. */
	function publishStored(room: BoardRoom, seq: string, update: Uint8Array, exceptSocket: string | null) {
		room.seen.add(seq);
		room.size.grew(update.byteLength);
		try {
			Y.applyUpdate(room.doc, update, ORIGIN_STORAGE);
		} catch (e) {
			log.error(`[collab] board ${room.id}: stored update ${seq} did not apply: ${(e as Error).message}`);
		}
		const local = io.local.to(roomOf(room.id));
		(exceptSocket ? local.except(exceptSocket) : local).emit(EVENT_MESSAGE, syncUpdateMessage(update));
		if (otherProcesses() > 0) {
			// Base64 in JSON goes through NOTIFY directly; raw bytes would take the adapter's
			// attachment-table path (an INSERT and a SELECT per message). Alone, nothing is sent:
			// a process that starts announces itself before it takes connections, and the log
			// re-read (catchUp) covers the moment before the others have heard of it.
			io.serverSideEmit(RELAY_UPDATE, room.id, seq, Buffer.from(update).toString('base64'));
		}
	}

	function applyRelayed(room: BoardRoom, seq: string, update: Uint8Array) {
		if (room.seen.has(seq)) return;
		room.seen.add(seq);
		room.size.grew(update.byteLength);
		try {
			Y.applyUpdate(room.doc, update, ORIGIN_RELAY);
		} catch (e) {
			log.error(`[collab] board ${room.id}: relayed update ${seq} did not apply: ${(e as Error).message}`);
			return;
		}
		io.local.to(roomOf(room.id)).emit(EVENT_MESSAGE, syncUpdateMessage(update));
	}

	function setReadOnly(member: RoomMember, readOnly: boolean, reason: string | null) {
		if (member.readOnly === readOnly && member.reason === reason) return;
		member.readOnly = readOnly;
		member.reason = reason;
		const ev: BoardStateEvent = { readOnly, reason };
		member.socket.emit(EVENT_STATE, ev);
	}

	/** Stores a decoded, non-empty update (or refuses it) and answers the sender. */
	async function storeUpdate(room: BoardRoom, member: RoomMember, update: Uint8Array, reply: (a: MessageAck) => void) {
		const item = {
			boardId: room.id,
			organisationId: member.viewer.organisationId,
			userId: member.viewer.userId,
			sessionId: member.viewer.sessionId,
			update
		};
		let seq: string | null;
		let access: Awaited<ReturnType<typeof loadBoardAccess>> | undefined;
		try {
			seq = member.readOnly ? null : await writer.enqueue(item);
			if (seq === null) {
				// Refused by the stored state (or known read-only): ask afresh why, in case the
				// member's role or the survey changed since the join.
				access = await loadBoardAccess(db, member.viewer, room.id);
				if (access && !access.readOnly && member.readOnly) {
					setReadOnly(member, false, null);
					seq = await writer.enqueue(item);
				}
			}
		} catch (e) {
			if (!(e instanceof StorageUnavailable) && !isConnectionError(e)) throw e;
			// Not stored, not refused: the sender keeps the change and sends it again. The shadow
			// copy may hold it already; it is rebuilt from the room's document next time.
			dropShadow(room);
			log.warn(`[collab] could not store an update from ${who(member.socket)}: ${(e as Error).message}`);
			return reply({
				ok: false,
				retry: 'The server cannot save changes just now. They are kept on this device and sent again automatically.',
				retryAfterMs: RETRY_AFTER_OUTAGE_MS
			});
		}
		if (seq === null) {
			dropShadow(room);
			const reason = access?.reason ?? 'You no longer have access to this board.';
			log.warn(`[collab] refused an update from ${who(member.socket)}: ${reason}`);
			setReadOnly(member, true, reason);
			reply({ ok: false, refused: reason, readOnly: true });
			if (!access) closeSocket(member.socket, 'access to the board was withdrawn');
			return;
		}
		if (room.state === 'gone') return reply({ ok: true });
		publishStored(room, seq, update, member.socket.id);
		reply({ ok: true });
		room.storedSinceCompaction++;
		maybeCompact(room);
	}

	function storeFailed(member: RoomMember) {
		return (e: unknown) => {
			log.error(`[collab] storing an update from ${who(member.socket)} failed:`, e);
			closeSocket(member.socket, `message could not be handled: ${(e as Error)?.message ?? String(e)}`);
		};
	}

	function dropShadow(room: BoardRoom) {
		room.shadow?.destroy();
		room.shadow = null;
	}

	/**
	 * The board policy (src/lib/board/model/policy.ts), the same the browser runs, on the room's
	 * shadow copy: null when the update may be stored, else the reasons in words for the person.
	 */
	function checkPolicy(room: BoardRoom, member: RoomMember, update: Uint8Array): string | null {
		if (!room.shadow) room.shadow = cloneDoc(room.doc);
		else catchUpShadow(room.shadow, room.doc);
		const r = checkBoardChange(
			room.doc,
			update,
			{ role: member.viewer.role, userId: member.viewer.userId, name: member.viewer.name },
			{
				frozen: false, // read-only members and frozen boards are refused by the store's own check
				limits: { ...options.boardLimits, maxUpdateBytes: options.maxUpdateBytes, maxDocumentBytes: options.maxDocumentBytes },
				documentBytes: room.size.bound
			},
			{ shadow: room.shadow }
		);
		if (r.ok) return null;
		// The shadow now holds a change the room will never get: start it afresh next time.
		dropShadow(room);
		return refusalMessage(r.refusals.map((x) => x.reason));
	}

	/** Client ids belong to the member who introduced them: null when the update keeps to its own. */
	async function checkClientIds(room: BoardRoom, member: RoomMember, decoded: ReturnType<typeof decodeUpdateStrict>): Promise<string | null> {
		const verdict = await ensureOwnership(db, room.owners, room.id, member.viewer.userId, structClientIds(decoded), (id) =>
			Y.getState(room.doc.store, id)
		);
		if (verdict.ok) return null;
		log.warn(`[collab] refused an update from ${who(member.socket)}: writes under client id ${verdict.clientId} of someone else`);
		return verdict.reason;
	}

	/** The answer to an update over a byte budget; logged once per burst, not per message. */
	function overBudget(room: BoardRoom, member: RoomMember, whose: 'connection' | 'board', retryAfterMs: number): MessageAck {
		const now = Date.now();
		if (now - (overBudgetLogged.get(member.socket.id) ?? 0) > 10_000) {
			overBudgetLogged.set(member.socket.id, now);
			log.warn(`[collab] slowing ${who(member.socket)}: over the ${whose} byte budget (${room.id})`);
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
	const overBudgetLogged = new Map<string, number>();

	/**
	 * Everything that can be wrong with a message is found here, synchronously, before anything
	 * is stored or sent: a malformed message closes the socket before its next message is read.
	 */
	function handleMessage(room: BoardRoom, member: RoomMember, bytes: Uint8Array, reply: (a: MessageAck) => void): Promise<void> | void {
		const message = parseFrame(bytes);
		switch (message.kind) {
			case 'step1': {
				// Each one costs an encoding of the board: the provider sends one per (re)join or rollback.
				if (!member.syncRequests.take()) {
					return closeSocket(member.socket, `more than ${SYNC_REQUESTS_PER_SECOND} sync requests per second (burst ${SYNC_REQUEST_BURST})`);
				}
				member.socket.emit(EVENT_MESSAGE, syncStep2Message(room.doc, message.stateVector));
				return reply({ ok: true });
			}
			case 'update': {
				const size = message.update.byteLength;
				if (size > options.maxUpdateBytes) {
					const reason = `This change is too large to save (${kib(size)}; the limit is ${kib(options.maxUpdateBytes)}). It was not saved.`;
					log.warn(`[collab] refused an update from ${who(member.socket)}: ${size} bytes, over the ${options.maxUpdateBytes}-byte limit`);
					return reply({ ok: false, refused: reason, readOnly: false });
				}
				const budget = spend(member.bytes, room.bytes, size);
				if (!budget.ok) return reply(overBudget(room, member, budget.who, budget.retryAfterMs));
				let decoded;
				try {
					decoded = decodeUpdateStrict(message.update);
				} catch (e) {
					throw new Malformed(`update does not decode: ${(e as Error).message}`);
				}
				// Nothing new (e.g. a read-only member's sync step 2 after a reconnect): nothing to store.
				if (isEmptyUpdate(decoded) || isCoveredBy(room.doc, decoded)) return reply({ ok: true });
				if (!member.readOnly && !room.size.fits(room.doc, size, options.maxDocumentBytes)) {
					const reason = `This board has reached its size limit (${kib(options.maxDocumentBytes)}). Your change was not saved.`;
					log.warn(`[collab] refused an update from ${who(member.socket)}: the board would pass ${options.maxDocumentBytes} bytes`);
					return reply({ ok: false, refused: reason, readOnly: false });
				}
				const update = message.update;
				const step = member.pending.then(async () => {
					if (member.readOnly) {
						void storeUpdate(room, member, update, reply).catch(storeFailed(member));
						return;
					}
					const refusal = checkPolicy(room, member, update);
					if (refusal) {
						log.warn(`[collab] refused an update from ${who(member.socket)}: ${refusal}`);
						return reply({ ok: false, refused: refusal, readOnly: false });
					}
					const forged = await checkClientIds(room, member, decoded);
					if (forged) {
						dropShadow(room);
						return reply({ ok: false, refused: forged, readOnly: false });
					}
					// Handed to the writer now (in order); its commit is awaited apart from the queue.
					void storeUpdate(room, member, update, reply).catch(storeFailed(member));
				});
				member.pending = step.catch(() => {});
				return step;
			}
			case 'awareness': {
				// Presence is passing news: over the budget it is dropped, not kept.
				if (member.bytes.waitMs() > 0) return reply({ ok: true });
				member.bytes.take(message.update.byteLength);
				let clean: Uint8Array;
				try {
					clean = sanitiseAwareness(room, member, message.update);
				} catch (e) {
					throw e instanceof Malformed ? e : new Malformed(`presence update does not decode: ${(e as Error).message}`);
				}
				applyAwarenessUpdate(room.awareness, clean, member.socket.id);
				return reply({ ok: true });
			}
		}
	}

	// ---- sockets ---------------------------------------------------------------------------

	io.on('connection', (socket) => {
		const viewer = socket.data.viewer as BoardViewer;
		const bucket = new TokenBucket(options.messagesPerSecond, options.messageBurst);
		const bytes = new ByteBucket(options.socketBytesPerSecond, options.socketByteBurst);

		socket.use((_packet, next) => {
			if (bucket.take()) return next();
			closeSocket(socket, `more than ${options.messagesPerSecond} messages per second (burst ${options.messageBurst})`);
		});

		socket.on(EVENT_JOIN, async (payload: unknown, ack: unknown) => {
			if (typeof ack !== 'function') return closeSocket(socket, 'join without an acknowledgement callback');
			const reply = ack as (r: JoinReply) => void;
			const parsed = joinRequestSchema.safeParse(payload);
			if (!parsed.success) {
				reply({ ok: false, error: 'A board id is needed to join.' });
				return closeSocket(socket, 'malformed join');
			}
			if (socket.data.boardId) return reply({ ok: false, error: 'This connection is already on a board.' });
			const { boardId } = parsed.data;
			try {
				const access = await loadBoardAccess(db, viewer, boardId);
				if (!access) {
					log.warn(`[collab] ${who(socket)} asked for board ${boardId}: not found in the organisation`);
					return reply({ ok: false, error: 'Board not found.' });
				}
				if (!socket.connected || closed) return;
				const room = await openRoom(boardId);
				if (!socket.connected) {
					if (room.members.size === 0) scheduleUnload(room);
					return;
				}
				if (room.unloadTimer) {
					clearTimeout(room.unloadTimer);
					room.unloadTimer = null;
				}
				socket.data.boardId = boardId;
				room.members.set(socket.id, {
					socket,
					viewer,
					readOnly: access.readOnly,
					reason: access.reason,
					clientIds: new Set(),
					bytes,
					syncRequests: new TokenBucket(SYNC_REQUESTS_PER_SECOND, SYNC_REQUEST_BURST),
					pending: Promise.resolve()
				});
				socket.join(roomOf(boardId));
				reply({
					ok: true,
					readOnly: access.readOnly,
					reason: access.reason,
					user: { id: viewer.userId, name: viewer.name },
					maxUpdateBytes: options.maxUpdateBytes
				});
				socket.emit(EVENT_MESSAGE, syncStep1Message(room.doc));
				if (room.awareness.states.size > 0) {
					socket.emit(EVENT_MESSAGE, frame(MESSAGE_AWARENESS, encodeAwarenessUpdate(room.awareness, [...room.awareness.states.keys()])));
				}
			} catch (e) {
				log.error(`[collab] join of board ${boardId} by ${who(socket)} failed: ${(e as Error).message}`);
				// Whatever failed (most likely the database), it may work in a moment.
				reply({ ok: false, error: 'The board could not be opened just now. Trying again…', retry: true });
			}
		});

		socket.on(EVENT_MESSAGE, (data: unknown, ack: unknown) => {
			const reply = typeof ack === 'function' ? (ack as (a: MessageAck) => void) : () => {};
			const parsed = messageSchema.safeParse(data);
			if (!parsed.success) return closeSocket(socket, `bad message: ${parsed.error.issues[0]?.message ?? 'invalid'}`);
			const room = socket.data.boardId ? rooms.get(socket.data.boardId as string) : undefined;
			const member = room?.members.get(socket.id);
			if (!room || !member || room.state !== 'ready') return closeSocket(socket, 'message before joining a board');
			const failed = (e: unknown) => {
				if (e instanceof Malformed) return closeSocket(socket, `malformed message: ${e.message}`);
				log.error(`[collab] message from ${who(socket)} failed:`, e);
				closeSocket(socket, `message could not be handled: ${(e as Error)?.message ?? String(e)}`);
			};
			try {
				handleMessage(room, member, parsed.data, reply)?.catch(failed);
			} catch (e) {
				failed(e);
			}
		});

		socket.on('disconnect', (reason) => {
			const boardId = socket.data.boardId as string | undefined;
			if (!boardId) return;
			const room = rooms.get(boardId);
			const member = room?.members.get(socket.id);
			if (!room || !member) return;
			room.members.delete(socket.id);
			if (reason !== 'client namespace disconnect' && reason !== 'server namespace disconnect') {
				log.info(`[collab] ${who(socket)} left: ${reason}`);
			}
			overBudgetLogged.delete(socket.id);
			if (member.clientIds.size) removeAwarenessStates(room.awareness, [...member.clientIds], ORIGIN_LEAVE);
			if (room.members.size === 0 && !closed) scheduleUnload(room);
		});
	});

	// ---- other processes -----------------------------------------------------------------

	if (options.cluster) {
		io.on(RELAY_UPDATE, (boardId: unknown, seq: unknown, b64: unknown) => {
			if (typeof boardId !== 'string' || typeof seq !== 'string' || typeof b64 !== 'string') return;
			const room = rooms.get(boardId);
			if (!room) return;
			const update = Buffer.from(b64, 'base64');
			if (room.state === 'loading') room.early.push({ seq, update });
			else if (room.state === 'ready') applyRelayed(room, seq, update);
		});
		io.on(RELAY_PRESENCE_REQUEST, (boardId: unknown) => {
			if (typeof boardId !== 'string') return;
			const room = rooms.get(boardId);
			if (!room || room.state !== 'ready') return;
			const ids = [...room.members.values()].flatMap((m) => [...m.clientIds]).filter((id) => room.awareness.states.has(id));
			if (ids.length) io.serverSideEmit(RELAY_AWARENESS, boardId, Buffer.from(encodeAwarenessUpdate(room.awareness, ids)).toString('base64'));
		});
		io.on(RELAY_AWARENESS, (boardId: unknown, b64: unknown) => {
			if (typeof boardId !== 'string' || typeof b64 !== 'string') return;
			const room = rooms.get(boardId);
			if (!room || room.state !== 'ready') return;
			try {
				applyAwarenessUpdate(room.awareness, Buffer.from(b64, 'base64'), ORIGIN_RELAY);
			} catch (e) {
				log.error(`[collab] relayed presence for board ${boardId} did not apply: ${(e as Error).message}`);
			}
		});
	}

	/** Heals a lost cross-process notification: re-reads each open board's log for rows not seen. */
	async function catchUp() {
		if (closed || otherProcesses() === 0) return;
		for (const room of rooms.values()) {
			if (room.state !== 'ready' || room.members.size === 0) continue;
			try {
				const missing = await readMissing(db, room.id, room.seen, room.snapshotSeq);
				if (!missing || room.state !== 'ready') continue;
				const fresh: Uint8Array[] = [];
				const collect = (u: Uint8Array, origin: unknown) => origin === ORIGIN_CATCH_UP && fresh.push(u);
				room.doc.on('update', collect);
				try {
					if (missing.snapshot) Y.applyUpdate(room.doc, missing.snapshot, ORIGIN_CATCH_UP);
					for (const r of missing.rows) {
						room.seen.add(r.seq);
						room.size.grew(r.update.byteLength);
						Y.applyUpdate(room.doc, r.update, ORIGIN_CATCH_UP);
					}
				} finally {
					room.doc.off('update', collect);
				}
				room.noteSnapshot(missing.snapshotSeq);
				if (fresh.length) {
					log.warn(`[collab] board ${room.id}: caught up ${fresh.length} change(s) missed from another process`);
					io.local.to(roomOf(room.id)).emit(EVENT_MESSAGE, syncUpdateMessage(Y.mergeUpdates(fresh)));
				}
			} catch (e) {
				log.error(`[collab] catch-up of board ${room.id} failed: ${(e as Error).message}`);
			}
		}
	}
	const catchUpTimer = options.catchUpMs > 0 ? setInterval(() => void catchUp(), options.catchUpMs) : null;
	catchUpTimer?.unref?.();

	/**
	 * A socket lives on after its session ends (sign-out, password reset, removal from the
	 * organisation): writes are refused at once by the append check; this also stops reads.
	 */
	async function sweepSessions() {
		const bySession = new Map<string, RoomMember[]>();
		for (const room of rooms.values()) {
			for (const m of room.members.values()) {
				const list = bySession.get(m.viewer.sessionId) ?? [];
				list.push(m);
				bySession.set(m.viewer.sessionId, list);
			}
		}
		if (bySession.size === 0 || closed) return;
		try {
			const live = await db
				.selectFrom('user_session')
				.select('id')
				.where('id', 'in', [...bySession.keys()])
				.where('expires_at', '>', new Date())
				.execute();
			const alive = new Set(live.map((r) => r.id));
			for (const [id, list] of bySession) if (!alive.has(id)) for (const m of list) closeSocket(m.socket, 'the session has ended');
		} catch (e) {
			log.error(`[collab] session sweep failed: ${(e as Error).message}`);
		}
	}
	const sweepTimer = options.sessionCheckMs > 0 ? setInterval(() => void sweepSessions(), options.sessionCheckMs) : null;
	sweepTimer?.unref?.();

	// ---- board state changes (approval, role changes) -----------------------------------------

	async function refreshRoom(boardId: string) {
		const room = rooms.get(boardId);
		if (!room || room.state !== 'ready') return;
		for (const member of [...room.members.values()]) {
			try {
				const access = await loadBoardAccess(db, member.viewer, boardId);
				if (!access) closeSocket(member.socket, 'access to the board was withdrawn');
				else setReadOnly(member, access.readOnly, access.reason);
			} catch (e) {
				log.error(`[collab] refreshing board ${boardId} failed: ${(e as Error).message}`);
			}
		}
	}

	// Board state changes from any process. The connection is re-opened whenever it is lost;
	// every open room is re-checked then, for whatever was announced meanwhile.
	const listener = listenForever(pool, BOARD_CHANNEL, {
		part: 'board-state listener',
		onNotify: (boardId) => void refreshRoom(boardId),
		onConnected: () => {
			for (const id of rooms.keys()) void refreshRoom(id);
		},
		log
	});

	return {
		stats() {
			let sockets = 0;
			for (const r of rooms.values()) sockets += r.members.size;
			return { rooms: rooms.size, sockets, pendingWrites: writer.pending, writer: writer.stats, storeMs: writer.batchTimes() };
		},
		async close() {
			closed = true;
			if (catchUpTimer) clearInterval(catchUpTimer);
			if (sweepTimer) clearInterval(sweepTimer);
			await listener.close();
			await writer.close();
			// Fold what was written into snapshots; not needed for safety (the log is durable).
			await Promise.all(
				[...rooms.values()].map(async (room) => {
					if (room.unloadTimer) clearTimeout(room.unloadTimer);
					if (room.state === 'ready') await runCompaction(room);
				})
			);
		}
	};
}
