// The one sync client of the live board. It runs in the browser and in Node (socket.io-client),
// and the board page, the tests, the benchmarks and integrations all use it.
//
//   const provider = new BoardProvider({ serverUrl, boardId, doc, cookie?, offline?, user? });
//   provider.awareness.setLocalStateField('cursor', { x, y });
//   provider.on('status', (s) => ...);   // 'connecting' | 'connected' | 'disconnected' | 'refused'
//   await provider.whenSynced();
//
// Connection: one socket.io connection per board. On connect it joins the board (the server
// checks the session and the organisation), then both sides exchange y-protocols sync step 1
// and 2 and the provider sends every local change as an update. In Node pass the session as
// `cookie` ('spotface_session=...'); the browser sends its own cookie.
//
// Acknowledgement: the server answers each update once it is stored. `unsynced` counts local
// changes (including those made offline) not yet acknowledged; it falls to 0 once the server
// has stored them all. After a page reload the count restarts at 0 even if the offline copy
// holds changes the server has not seen yet; they are sent with the first sync all the same.
//
// Refusal and rollback: when the server refuses an update (the board policy, an approved board,
// an ended session) the provider does not try to undo the change in place: a Yjs document cannot
// forget what it has integrated, and an undo would be a new change the server refuses again.
// Instead it loads the server's state into a fresh Y.Doc and swaps it in. Nothing the person did
// is thrown away: their copy is compared with the server's item by item (set-aside.ts); each
// difference the board policy (`check`) accepts is written again into the fresh copy and sent,
// and the rest is emitted as 'set-aside' (entries with the reason) for the board's "not
// accepted" tray. Then it emits 'doc' (newDoc) and 'refused' (reason, { kind: 'update', doc }).
// The UI must re-bind to `provider.doc` on 'doc'. The old document is left as it was (not
// destroyed), and so is its offline copy: the fresh document gets an offline copy of its own.
//
// Overwrites: a value the person set while offline that loses to someone else's concurrent edit
// is reported as 'overwritten' (OverwriteNotice: both values and who set the other one).
// A refused join or handshake emits 'refused' (reason, { kind: 'join' | 'session' }) and sets
// status 'refused'; the provider then stays disconnected.
//
// Not stored for now: when the server cannot store an update yet (the database is away, or this
// connection or board is over its byte budget) it answers `retry` with a wait. The provider keeps
// the change, holds back every change that follows, and after the wait sends them all as one
// merged update (waits grow while it keeps happening). `delayed` holds the server's reason
// meanwhile ('delayed' event; null once everything held back is stored). The same goes for a
// join or handshake the server could not complete for now: the provider connects again later.
//
// Offline: in the browser (offline !== false and indexedDB present) the document is kept in
// IndexedDB through y-indexeddb, so the board opens and takes edits without a connection; on
// reconnect the sync exchange merges both sides. IndexedDB is never used in Node unless asked.
import * as Y from 'yjs';
import { Awareness, applyAwarenessUpdate, encodeAwarenessUpdate, removeAwarenessStates } from 'y-protocols/awareness';
import { awarenessFrame, receiveFrame, syncStep1Frame, syncUpdateFrame, updateOfFrame } from './frames';
import { io, type Socket } from 'socket.io-client';
import {
	EVENT_CLOSED,
	EVENT_JOIN,
	EVENT_MESSAGE,
	EVENT_STATE,
	type BoardStateEvent,
	type HandshakeErrorData,
	type JoinReply,
	type MessageAck
} from './protocol';
import { labelFor, reapply, unacceptedWork, type ChangeCheck, type SetAsideEntry } from './set-aside';
import { OverwriteWatch, type OverwriteNotice } from './overwrites';

export type ProviderStatus = 'connecting' | 'connected' | 'disconnected' | 'refused';
export type ProviderEvent = 'status' | 'synced' | 'unsynced' | 'refused' | 'readonly' | 'doc' | 'delayed' | 'set-aside' | 'overwritten';
export type { SetAsideEntry, OverwriteNotice, ChangeCheck };

/** Origin of differences written again after a refusal: sent to the server, not undoable. */
export const REAPPLY_ORIGIN: unique symbol = Symbol('spotface.board.reapply');

export interface RefusalDetail {
	/** 'update': a change was refused and rolled back; 'join': the board cannot be opened; 'session': sign in again. */
	kind: 'update' | 'join' | 'session';
	doc?: Y.Doc;
	/** The board policy on this device refused it before it was sent. */
	local?: boolean;
}

export interface BoardProviderOptions {
	serverUrl: string;
	boardId: string;
	doc: Y.Doc;
	/** Node only: the Cookie header carrying the session, e.g. 'spotface_session=...'. */
	cookie?: string;
	/** Keep an offline copy in IndexedDB (browser only). Default: true where indexedDB exists. */
	offline?: boolean;
	/** Presence identity (the server replaces the name with the signed-in member's). */
	user?: { name: string; color: string };
	/** Connect at once (default true). */
	connect?: boolean;
	/** socket.io path (default '/socket.io'). */
	path?: string;
	/** Longest pause between presence messages while the pointer moves (default 50 ms). */
	awarenessThrottleMs?: number;
	/**
	 * The board policy for the signed-in person: after a refusal, each difference it accepts is
	 * written again; without it every difference is set aside.
	 */
	check?: ChangeCheck;
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- each event passes its own arguments (see the events listed at the top)
type Listener = (...a: any[]) => void;

const isBrowser = typeof window !== 'undefined' && typeof document !== 'undefined';
const OFFLINE_PREFIX = 'spotface-board-';
/** How long after the server's (or the offline copy's) changes the policy's copy takes them in. */
const ACCEPTED_CATCH_UP_MS = 1500;
const GENERATION_PREFIX = 'spotface-board-generation-';

/** Which offline copy of a board is current: each refusal starts a new one and keeps the old. */
function offlineGeneration(boardId: string): number {
	try {
		return Number(globalThis.localStorage?.getItem(GENERATION_PREFIX + boardId) ?? 0) || 0;
	} catch {
		return 0;
	}
}
function setOfflineGeneration(boardId: string, n: number) {
	try {
		globalThis.localStorage?.setItem(GENERATION_PREFIX + boardId, String(n));
	} catch {
		/* private mode: the next load starts from generation 0 and the server's state */
	}
}
function offlineName(boardId: string, generation: number) {
	return generation ? `${OFFLINE_PREFIX}${boardId}~${generation}` : OFFLINE_PREFIX + boardId;
}
function deleteDatabase(name: string) {
	return new Promise<void>((resolve) => {
		const r = indexedDB.deleteDatabase(name);
		r.onsuccess = r.onerror = r.onblocked = () => resolve();
	});
}

interface OfflineStore {
	whenSynced: Promise<unknown>;
	destroy(): Promise<void>;
	clearData(): Promise<void>;
}

export class BoardProvider {
	readonly awareness: Awareness;
	readonly boardId: string;
	status: ProviderStatus = 'disconnected';
	synced = false;
	unsynced = 0;
	readOnly = false;
	/** Why the board is read-only, as the server put it (null when writable). */
	readOnlyReason: string | null = null;
	/** Why changes are being held back for now, as the server put it (null when they are not). */
	delayed: string | null = null;

	#doc: Y.Doc;
	#socket: Socket | null = null;
	#listeners = new Map<string, Set<Listener>>();
	#opts: BoardProviderOptions;
	#joined = false;
	#wantConnected = false;
	#destroyed = false;
	/** Local changes made so far, and how many of them the server has acknowledged. */
	#localSeq = 0;
	#ackedSeq = 0;
	/** Bumped on every document swap; acks for an older document are ignored. */
	#generation = 0;
	#pendingRefusal: string | null = null;
	#syncWaiters: Array<() => void> = [];
	#offline: OfflineStore | null = null;
	#offlineReady: Promise<void> = Promise.resolve();
	#awarenessTimer: ReturnType<typeof setTimeout> | null = null;
	#awarenessLastSent = 0;
	#reconnectTimer: ReturnType<typeof setTimeout> | null = null;
	/** The person's copy at the last refusal, compared with the server's once that arrives. */
	#refusedDoc: Y.Doc | null = null;
	/** Refusals since the server last accepted something: a second one sets everything aside. */
	#refusalStreak = 0;
	#watch: OverwriteWatch;
	/**
	 * With a `check`: the document as the policy last accepted it (the server's changes, the
	 * offline copy and the person's accepted changes). A local change the policy refuses is not
	 * sent; the board goes back to this state and the change goes to the tray.
	 */
	#accepted: Y.Doc | null = null;
	/**
	 * Updates taken as they are (the server's, the offline copy's, replays) that `#accepted` has
	 * not had yet: they are applied when the policy next needs it (the person's own change) or
	 * when the page is idle, so opening a board does not apply its whole content twice before the
	 * first drawing.
	 */
	#acceptedPending: Uint8Array[] = [];
	#acceptedTimer: ReturnType<typeof setTimeout> | null = null;
	#checkingLocal = false;
	/** Updates the server could not store yet, with the local change count each covers. */
	#held: Array<{ update: Uint8Array; upTo: number }> = [];
	#heldTimer: ReturnType<typeof setTimeout> | null = null;
	/** Consecutive "not now" answers (updates, joins, handshakes): the wait grows with them. */
	#retries = 0;
	/** The largest update the server takes (from the join); held-back changes are merged up to it. */
	#maxUpdateBytes = Infinity;

	constructor(opts: BoardProviderOptions) {
		this.#opts = opts;
		this.boardId = opts.boardId;
		this.#doc = opts.doc;
		this.awareness = new Awareness(opts.doc);
		if (opts.user) this.awareness.setLocalStateField('user', opts.user);
		this.#doc.on('update', this.#onDocUpdate);
		this.#watch = this.#newWatch(this.#doc);
		if (opts.check) {
			this.#accepted = new Y.Doc();
			Y.applyUpdate(this.#accepted, Y.encodeStateAsUpdate(this.#doc));
		}
		this.awareness.on('update', this.#onAwarenessUpdate);
		const wantOffline = opts.offline ?? (isBrowser && typeof indexedDB !== 'undefined');
		if (wantOffline && typeof indexedDB !== 'undefined') this.#offlineReady = this.#openOffline(this.#doc);
		if (opts.connect !== false) this.connect();
	}

	/** The document being synced. It changes only after a refused update (see 'doc'). */
	get doc(): Y.Doc {
		return this.#doc;
	}

	on(event: ProviderEvent, cb: Listener): () => void {
		let set = this.#listeners.get(event);
		if (!set) this.#listeners.set(event, (set = new Set()));
		set.add(cb);
		return () => set!.delete(cb);
	}

	#emit(event: ProviderEvent, ...args: unknown[]) {
		for (const cb of [...(this.#listeners.get(event) ?? [])]) {
			try {
				cb(...args);
			} catch (e) {
				console.error(`[board sync] '${event}' listener failed:`, e);
			}
		}
	}

	/** Resolves when the current connection has finished its sync with the server. */
	whenSynced(): Promise<void> {
		if (this.synced) return Promise.resolve();
		return new Promise((r) => this.#syncWaiters.push(r));
	}

	/**
	 * Takes the board's stored state fetched some other way (the board page fetches it while the
	 * connection opens; see stored-state.ts) as the server's: nothing of it is sent back or counted
	 * as a local change. Skipped once the live sync has finished (it brought everything then).
	 * Updates that do not apply are skipped. Returns how many were applied.
	 */
	applyStoredState(updates: readonly Uint8Array[]): number {
		if (this.#destroyed || this.synced) return 0;
		const doc = this.#doc;
		const applied: Uint8Array[] = [];
		let failed = false;
		// What #onDocUpdate does with the server's changes is done here with the stored updates
		// themselves: without it listening, Yjs need not encode the whole board again as one
		// 'update' (other listeners, e.g. the offline copy once open, still get it).
		doc.off('update', this.#onDocUpdate);
		try {
			doc.transact(() => {
				for (const u of updates) {
					try {
						Y.applyUpdate(doc, u, this);
						applied.push(u);
					} catch (e) {
						failed = true;
						console.error('[board sync] a stored update could not be applied; the live sync brings the board:', e);
					}
				}
			}, this);
		} finally {
			if (doc === this.#doc) doc.on('update', this.#onDocUpdate);
		}
		if (this.#accepted && applied.length) {
			// One that failed may have left part of itself: then the policy's copy takes the whole document.
			if (failed) this.#acceptedPending.push(Y.encodeStateAsUpdate(doc));
			else this.#acceptedPending.push(...applied);
			this.#scheduleAcceptedCatchUp();
		}
		return applied.length;
	}

	/**
	 * Whether this browser holds an offline copy of a board, without opening it (ask before
	 * creating the board's provider: opening the copy creates it). False where that cannot be
	 * told quickly (no `indexedDB.databases()`).
	 */
	static async hasOfflineCopy(boardId: string): Promise<boolean> {
		if (typeof indexedDB === 'undefined' || typeof indexedDB.databases !== 'function') return false;
		try {
			const name = offlineName(boardId, offlineGeneration(boardId));
			return (await indexedDB.databases()).some((d) => d.name === name);
		} catch {
			return false;
		}
	}

	/** Resolves when the offline copy (if any) has been loaded into the document. */
	whenLocalLoaded(): Promise<void> {
		return this.#offlineReady;
	}

	connect() {
		if (this.#destroyed) return;
		this.#wantConnected = true;
		if (this.status === 'refused') return;
		if (!this.#socket) this.#socket = this.#createSocket();
		if (!this.#socket.connected) {
			this.#setStatus('connecting');
			this.#socket.connect();
		}
	}

	disconnect() {
		this.#wantConnected = false;
		if (this.#reconnectTimer) clearTimeout(this.#reconnectTimer);
		this.#reconnectTimer = null;
		this.#clearHeld();
		if (this.#socket?.connected && this.awareness.getLocalState() !== null) {
			// Let the others see us go at once rather than after the server notices.
			this.#send(awarenessFrame(encodeAwarenessUpdate(this.awareness, [this.awareness.clientID], new Map())));
		}
		this.#socket?.disconnect();
		this.#onDisconnected();
		if (this.status !== 'refused') this.#setStatus('disconnected');
	}

	async destroy(): Promise<void> {
		if (this.#destroyed) return;
		this.disconnect();
		this.#destroyed = true;
		this.#socket?.removeAllListeners();
		this.#socket = null;
		if (this.#awarenessTimer) clearTimeout(this.#awarenessTimer);
		if (this.#acceptedTimer) clearTimeout(this.#acceptedTimer);
		this.#acceptedTimer = null;
		this.#acceptedPending = [];
		this.#doc.off('update', this.#onDocUpdate);
		this.#watch.destroy();
		this.awareness.off('update', this.#onAwarenessUpdate);
		this.awareness.destroy();
		await this.#offlineReady.catch(() => {});
		await this.#offline?.destroy();
		this.#offline = null;
		this.#listeners.clear();
	}

	/** Deletes every board's offline copy in this browser (e.g. on sign-out on a shared tablet). */
	static async clearOfflineCopies(): Promise<void> {
		if (typeof indexedDB === 'undefined' || typeof indexedDB.databases !== 'function') return;
		const dbs = await indexedDB.databases();
		await Promise.all(dbs.filter((d) => d.name?.startsWith(OFFLINE_PREFIX)).map((d) => deleteDatabase(d.name!)));
	}

	/**
	 * Deletes the offline copies a board's earlier refusals left behind (kept until the person has
	 * dealt with the "not accepted" tray). The current copy stays.
	 */
	static async forgetEarlierCopies(boardId: string): Promise<void> {
		if (typeof indexedDB === 'undefined') return;
		const current = offlineGeneration(boardId);
		const names = [];
		for (let g = 0; g < current; g++) names.push(offlineName(boardId, g));
		await Promise.all(names.map(deleteDatabase));
	}

	/** This board's offline copies from earlier refusals, once the tray is empty. */
	forgetEarlierCopies(): Promise<void> {
		return BoardProvider.forgetEarlierCopies(this.boardId);
	}

	#newWatch(doc: Y.Doc): OverwriteWatch {
		return new OverwriteWatch(
			doc,
			(origin) => origin === this,
			(n) => this.#emit('overwritten', n)
		);
	}

	// ---- internals ------------------------------------------------------------------------

	#createSocket(): Socket {
		const socket = io(this.#opts.serverUrl, {
			path: this.#opts.path ?? '/socket.io',
			autoConnect: false,
			forceNew: true,
			reconnection: true,
			reconnectionDelay: 500,
			reconnectionDelayMax: 5000,
			// WebSocket first; the browser falls back to long-polling where a proxy blocks it.
			transports: isBrowser ? ['websocket', 'polling'] : ['websocket'],
			tryAllTransports: isBrowser,
			withCredentials: true,
			extraHeaders: this.#opts.cookie ? { cookie: this.#opts.cookie } : undefined
		});
		socket.on('connect', () => void this.#join(socket));
		socket.on('connect_error', (err: Error & { data?: unknown }) => {
			// A refusal by the handshake middleware (no or ended session) is final, unless the
			// server says it could not check just now; network errors are retried by socket.io.
			if (!socket.active && (err.data as HandshakeErrorData | undefined)?.retry) this.#reconnectLater(socket);
			else if (!socket.active) this.#refuse(err.message || 'unauthorised', 'session');
			else this.#setStatus('connecting');
		});
		socket.on('disconnect', (reason) => {
			this.#onDisconnected();
			if (this.status === 'refused') return;
			this.#setStatus(this.#wantConnected ? 'connecting' : 'disconnected');
			// The server closed us (a limit, or it is shutting down): try again a little later.
			if (reason === 'io server disconnect' && this.#wantConnected && !this.#destroyed) {
				this.#reconnectTimer = setTimeout(() => {
					this.#reconnectTimer = null;
					if (this.#wantConnected && this.status !== 'refused') socket.connect();
				}, 2000);
			}
		});
		socket.on(EVENT_MESSAGE, (data: ArrayBuffer | Uint8Array) => this.#onMessage(data));
		socket.on(EVENT_STATE, (ev: BoardStateEvent) => this.#setReadOnly(ev.readOnly, ev.reason));
		socket.on(EVENT_CLOSED, (ev: { reason?: string }) => {
			console.warn(`[board sync] the server closed the connection: ${ev?.reason ?? 'no reason given'}`);
		});
		return socket;
	}

	async #join(socket: Socket) {
		let reply: JoinReply;
		try {
			reply = (await socket.timeout(15_000).emitWithAck(EVENT_JOIN, { boardId: this.boardId })) as JoinReply;
		} catch {
			// No answer: drop the connection and let socket.io reconnect.
			if (socket.connected) {
				socket.disconnect();
				if (this.#wantConnected) socket.connect();
			}
			return;
		}
		if (socket !== this.#socket) return;
		if (!reply.ok && reply.retry) {
			socket.disconnect();
			this.#reconnectLater(socket);
			return;
		}
		if (!reply.ok) {
			this.#refuse(reply.error, 'join');
			socket.disconnect();
			return;
		}
		this.#retries = 0;
		this.#maxUpdateBytes = reply.maxUpdateBytes ?? Infinity;
		// The sync step 2 below carries everything the server lacks, held-back changes included.
		this.#clearHeld();
		this.#joined = true;
		this.#setReadOnly(reply.readOnly, reply.reason);
		this.#setStatus('connected');
		// Our state vector; the server answers with what we miss (sync step 2) and asks for ours.
		this.#send(syncStep1Frame(this.#doc));
		// Re-announce presence with a new clock: the server may still hold our last clock from
		// before the reconnect and would ignore the same one.
		const state = this.awareness.getLocalState();
		if (state !== null) this.awareness.setLocalState(state);
	}

	#onDisconnected() {
		this.#joined = false;
		if (this.synced) {
			this.synced = false;
			this.#emit('synced', false);
		}
		// Nobody else is known to be here while we are not connected.
		const others = [...this.awareness.getStates().keys()].filter((id) => id !== this.awareness.clientID);
		if (others.length) removeAwarenessStates(this.awareness, others, this);
	}

	/** The server could not take us just now: connect again after a growing wait. */
	#reconnectLater(socket: Socket) {
		this.#setStatus('connecting');
		if (this.#reconnectTimer || this.#destroyed) return;
		this.#reconnectTimer = setTimeout(() => {
			this.#reconnectTimer = null;
			if (this.#wantConnected && this.status !== 'refused' && socket === this.#socket && !socket.connected) socket.connect();
		}, this.#backOff(1000));
	}

	#backOff(base: number) {
		const wait = Math.min(15_000, base * 1.5 ** Math.min(this.#retries++, 8));
		return wait * (0.8 + Math.random() * 0.4);
	}

	#setDelayed(reason: string | null) {
		if (this.delayed === reason) return;
		this.delayed = reason;
		this.#emit('delayed', reason);
	}

	#clearHeld() {
		if (this.#heldTimer) clearTimeout(this.#heldTimer);
		this.#heldTimer = null;
		this.#held = [];
		this.#setUnsynced();
		this.#setDelayed(null);
	}

	/** Not stored yet: keep it, hold back what follows, send all of it again after the wait. */
	#hold(updates: Uint8Array[], upTo: number, reason: string, retryAfterMs: number) {
		for (const update of updates) this.#held.push({ update, upTo });
		this.#setUnsynced();
		this.#setDelayed(reason);
		if (this.#heldTimer) return;
		const wait = Math.max(retryAfterMs, this.#backOff(250));
		this.#heldTimer = setTimeout(() => {
			this.#heldTimer = null;
			if (!this.#joined || this.#held.length === 0) return; // the next join's sync step 2 carries them
			const held = this.#held;
			this.#held = [];
			// Merged in order, in pieces no larger than the server takes (a merge is never larger
			// than its parts together); whatever is still too much comes back to be held again.
			let group: typeof held = [];
			let bytes = 0;
			const flush = () => {
				if (!group.length) return;
				const updates = group.map((h) => h.update);
				this.#sendUpdate(
					syncUpdateFrame(updates.length === 1 ? updates[0] : Y.mergeUpdates(updates)),
					Math.max(...group.map((h) => h.upTo)),
					updates
				);
				group = [];
				bytes = 0;
			};
			for (const h of held) {
				if (group.length && bytes + h.update.byteLength > this.#maxUpdateBytes - 64) flush();
				group.push(h);
				bytes += h.update.byteLength;
			}
			flush();
		}, wait);
	}

	#refuse(reason: string, kind: RefusalDetail['kind']) {
		this.#wantConnected = false;
		this.#setStatus('refused');
		this.#emit('refused', reason, { kind } satisfies RefusalDetail);
	}

	#setStatus(s: ProviderStatus) {
		if (this.status === s) return;
		this.status = s;
		this.#emit('status', s);
	}

	#setReadOnly(readOnly: boolean, reason: string | null) {
		this.readOnlyReason = reason;
		if (this.readOnly === readOnly) return;
		this.readOnly = readOnly;
		this.#emit('readonly', readOnly, reason);
	}

	#setUnsynced() {
		// A held-back update may be older than a later one the server acknowledged.
		const acked = this.#held.length ? Math.min(this.#ackedSeq, Math.min(...this.#held.map((h) => h.upTo)) - 1) : this.#ackedSeq;
		const n = Math.max(0, this.#localSeq - acked);
		if (n === this.unsynced) return;
		this.unsynced = n;
		this.#emit('unsynced', n);
	}

	#send(message: Uint8Array, onAck?: (ack: MessageAck) => void) {
		const socket = this.#socket;
		if (!socket?.connected) return;
		if (onAck) socket.emit(EVENT_MESSAGE, message, onAck);
		else socket.emit(EVENT_MESSAGE, message);
	}

	/**
	 * Sends an update; when the server has stored it, local changes up to `upTo` are synced.
	 * `updates`: the document update(s) in the message, kept in case the server cannot store them yet.
	 */
	#sendUpdate(message: Uint8Array, upTo: number, updates?: Uint8Array[]) {
		const generation = this.#generation;
		this.#send(message, (ack) => {
			if (generation !== this.#generation || this.#destroyed) return;
			if (ack?.ok) {
				this.#refusalStreak = 0;
				this.#ackedSeq = Math.max(this.#ackedSeq, upTo);
				if (this.#held.length === 0 && !this.#heldTimer) {
					this.#retries = 0;
					this.#setDelayed(null);
				}
				this.#setUnsynced();
			} else if (ack && 'refused' in ack) {
				this.#rollBack(ack.refused, ack.readOnly);
			} else if (ack && 'retry' in ack) {
				this.#hold(updates ?? [updateOfFrame(message)], upTo, ack.retry, ack.retryAfterMs);
			}
		});
	}

	#onDocUpdate = (update: Uint8Array, origin: unknown) => {
		if (this.#accepted) {
			// The person's own change is tried against the board policy before it is sent, so they
			// learn at once; everything else (the server, the offline copy, replays) is taken as is.
			const own = origin !== this && origin !== this.#offline && origin !== REAPPLY_ORIGIN && !this.#checkingLocal;
			if (own) {
				this.#catchUpAccepted();
				const why = this.#opts.check!(this.#accepted, update);
				if (why) {
					this.#refuseLocally(why);
					return;
				}
				Y.applyUpdate(this.#accepted, update, this);
			} else {
				this.#acceptedPending.push(update);
				this.#scheduleAcceptedCatchUp();
			}
		}
		if (origin === this) return; // from the server
		// What the offline copy loads may or may not be on the server already: it is sent (the
		// server drops what it has) but not counted as an unsynced change.
		if (origin === null || origin !== this.#offline) {
			this.#localSeq++;
			this.#setUnsynced();
		}
		if (!this.#joined) return; // sent with the next sync step 2
		// While earlier changes wait to be sent again, this one waits with them.
		if (this.#heldTimer) {
			this.#held.push({ update, upTo: this.#localSeq });
			return;
		}
		this.#sendUpdate(syncUpdateFrame(update), this.#localSeq, [update]);
	};

	#onAwarenessUpdate = ({ added, updated, removed }: { added: number[]; updated: number[]; removed: number[] }, origin: unknown) => {
		if (origin === this) return;
		const mine = this.awareness.clientID;
		if (!added.includes(mine) && !updated.includes(mine) && !removed.includes(mine)) return;
		this.#scheduleAwareness();
	};

	/** Presence goes out at most every `awarenessThrottleMs`, always with the latest state. */
	#scheduleAwareness() {
		if (!this.#joined || this.#awarenessTimer) return;
		const gap = this.#opts.awarenessThrottleMs ?? 50;
		const wait = Math.max(0, this.#awarenessLastSent + gap - Date.now());
		const flush = () => {
			this.#awarenessTimer = null;
			this.#awarenessLastSent = Date.now();
			if (!this.#joined) return;
			this.#send(awarenessFrame(encodeAwarenessUpdate(this.awareness, [this.awareness.clientID])));
		};
		if (wait === 0) flush();
		else this.#awarenessTimer = setTimeout(flush, wait);
	}

	#onMessage(data: ArrayBuffer | Uint8Array) {
		const bytes = data instanceof Uint8Array ? data : new Uint8Array(data);
		try {
			const upTo = this.#localSeq;
			const frame = receiveFrame(bytes, this.#doc, this);
			if (frame.kind === 'step1') {
				// Our sync step 2 (everything the server lacks, offline edits included).
				this.#sendUpdate(frame.reply, upTo);
			} else if (frame.kind === 'step2') {
				this.#onSynced();
			} else if (frame.kind === 'awareness') {
				applyAwarenessUpdate(this.awareness, frame.update, this);
			}
		} catch (e) {
			console.error('[board sync] could not read a message from the server:', e);
		}
	}

	#onSynced() {
		if (!this.synced) {
			this.synced = true;
			this.#emit('synced', true);
		}
		if (this.#pendingRefusal !== null) {
			const reason = this.#pendingRefusal;
			this.#pendingRefusal = null;
			const old = this.#refusedDoc;
			this.#refusedDoc = null;
			if (old) this.#setAside(old, reason);
			this.#emit('doc', this.#doc);
			this.#emit('refused', reason, { kind: 'update', doc: this.#doc } satisfies RefusalDetail);
		}
		for (const r of this.#syncWaiters.splice(0)) r();
	}

	/**
	 * Compares the person's copy with the server's (now in this.#doc): what the policy accepts is
	 * written again and sent; the rest goes to the "not accepted" tray with the reason.
	 */
	#setAside(old: Y.Doc, serverReason: string, localCheck?: ChangeCheck) {
		let entries: SetAsideEntry[] = [];
		try {
			const differences = unacceptedWork(old, this.#doc);
			// A change the policy passed but the server refused again is not tried a third time.
			const check = localCheck ?? (this.#refusalStreak > 1 || this.readOnly ? null : (this.#opts.check ?? null));
			const { refused } = reapply(this.#doc, differences, check, serverReason, REAPPLY_ORIGIN);
			const at = Date.now();
			entries = refused.map(({ difference, reason }, i) => ({
				...difference,
				id: `sa-${at.toString(36)}-${i}-${Math.random().toString(36).slice(2, 8)}`,
				label: labelFor(difference, old),
				reason,
				at
			}));
		} catch (e) {
			console.error('[board sync] could not compare the refused work with the board:', e);
		}
		if (entries.length) this.#emit('set-aside', entries);
	}

	/** Brings `#accepted` up to date with the updates taken meanwhile. */
	#catchUpAccepted() {
		if (this.#acceptedTimer) clearTimeout(this.#acceptedTimer);
		this.#acceptedTimer = null;
		const accepted = this.#accepted;
		const pending = this.#acceptedPending;
		if (!accepted || pending.length === 0) return;
		this.#acceptedPending = [];
		Y.transact(accepted, () => {
			for (const u of pending) Y.applyUpdate(accepted, u, this);
		});
	}

	/** Catches `#accepted` up a moment later, when the page is likely idle (after the first drawing). */
	#scheduleAcceptedCatchUp() {
		if (this.#acceptedTimer || this.#destroyed) return;
		this.#acceptedTimer = setTimeout(() => {
			this.#acceptedTimer = null;
			if (!this.#destroyed) this.#catchUpAccepted();
		}, ACCEPTED_CATCH_UP_MS);
	}

	/**
	 * The board policy refused the person's change before it was sent: the board goes back to the
	 * last accepted state (nothing to ask the server), and the change goes to the tray.
	 */
	#refuseLocally(reason: string) {
		const old = this.#doc;
		old.off('update', this.#onDocUpdate);
		const fresh = new Y.Doc();
		this.#checkingLocal = true;
		try {
			this.#catchUpAccepted();
			Y.applyUpdate(fresh, Y.encodeStateAsUpdate(this.#accepted!));
		} finally {
			this.#checkingLocal = false;
		}
		fresh.on('update', this.#onDocUpdate);
		this.#watch.destroy();
		this.#watch = this.#newWatch(fresh);
		this.#doc = fresh;
		// The offline copy has the refused change too: the fresh document gets its own copy.
		if (this.#offline) {
			const store = this.#offline;
			this.#offline = null;
			setOfflineGeneration(this.boardId, offlineGeneration(this.boardId) + 1);
			this.#offlineReady = store
				.destroy()
				.catch(() => {})
				.then(() => this.#openOffline(fresh)); // y-indexeddb stores the fresh document's state first
		}
		this.#setAside(old, reason, this.#opts.check!);
		this.#emit('doc', fresh);
		this.#emit('refused', reason, { kind: 'update', doc: fresh, local: true } satisfies RefusalDetail);
	}

	/** The server refused a change: continue on a fresh copy of the server's state. */
	#rollBack(reason: string, readOnly: boolean) {
		this.#setReadOnly(readOnly || this.readOnly, readOnly ? reason : this.readOnlyReason);
		this.#generation++;
		this.#refusalStreak++;
		this.#clearHeld();
		const old = this.#doc;
		old.off('update', this.#onDocUpdate);
		// A second refusal before the first was dealt with: compare with the oldest copy.
		this.#refusedDoc = this.#refusedDoc ?? old;
		const fresh = new Y.Doc();
		fresh.on('update', this.#onDocUpdate);
		this.#watch.destroy();
		this.#watch = this.#newWatch(fresh);
		this.#doc = fresh;
		if (this.#accepted) {
			// Starts again from the server's state, which arrives as the fresh document's sync.
			this.#accepted.destroy();
			this.#accepted = new Y.Doc();
			this.#acceptedPending = [];
		}
		this.#localSeq = 0;
		this.#ackedSeq = 0;
		this.#setUnsynced();
		this.#pendingRefusal = reason;
		if (this.synced) {
			this.synced = false;
			this.#emit('synced', false);
		}
		// The offline copy holds the refused change too. It is kept (closed) until the person has
		// dealt with the tray; the fresh document starts an offline copy of its own.
		if (this.#offline) {
			const store = this.#offline;
			this.#offline = null;
			setOfflineGeneration(this.boardId, offlineGeneration(this.boardId) + 1);
			this.#offlineReady = store
				.destroy()
				.catch(() => {})
				.then(() => this.#openOffline(fresh));
		}
		// Ask for the whole state (empty state vector); 'refused' follows once it is here.
		this.#send(syncStep1Frame(fresh));
	}

	async #openOffline(doc: Y.Doc): Promise<void> {
		const { IndexeddbPersistence } = await import('y-indexeddb');
		if (this.#destroyed || doc !== this.#doc) return;
		const store = new IndexeddbPersistence(offlineName(this.boardId, offlineGeneration(this.boardId)), doc);
		this.#offline = store as unknown as OfflineStore;
		await store.whenSynced;
	}
}
