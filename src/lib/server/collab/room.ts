// One open board in this process: its document, presence, members and the bookkeeping the hooks
// share (what of the log it has applied, the policy's shadow copy, client-id owners, budgets).
// State only; what happens to a room is in the hook modules (hooks/*.ts).
import type { Socket } from 'socket.io';
import * as Y from 'yjs';
import { Awareness } from 'y-protocols/awareness';
import type { BoardViewer } from './access';
import { ByteBucket, DocumentSize } from './budget';
import type { TokenBucket } from './rate-limit';
import type { CollabOptions } from './config';

/** Origins of changes to a room's document and presence. */
export const ORIGIN_STORAGE = 'storage';
/** An update that passed the board policy on the shadow copy, which therefore holds it already. */
export const ORIGIN_CHECKED = 'checked';
export const ORIGIN_RELAY = 'relay';
export const ORIGIN_CATCH_UP = 'catch-up';
export const ORIGIN_LEAVE = 'leave';

/** Sync requests (step 1) a socket may send: each costs the server an encoding of the board. */
export const SYNC_REQUESTS_PER_SECOND = 2;
export const SYNC_REQUEST_BURST = 10;

export interface RoomMember {
	socket: Socket;
	viewer: BoardViewer;
	readOnly: boolean;
	reason: string | null;
	clientIds: Set<number>;
	/** Bytes of updates and presence (budget.ts). */
	bytes: ByteBucket;
	syncRequests: TokenBucket;
	/**
	 * The member's updates still being checked: each waits for the one before and is handed to
	 * the writer in the order sent, so acknowledgements come in that order (hooks/receive.ts).
	 */
	inFlight: Promise<void>;
	/**
	 * Some of the member's updates were answered "not now" and not sent again yet: a later one
	 * that builds on them is answered "not now" too (not refused), so nothing is taken out of
	 * order while the client holds the earlier ones (hooks/check.ts).
	 */
	heldBack: boolean;
}

export class BoardRoom {
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
	/**
	 * The document took a change the shadow has not seen (relayed, caught up, stored for a member
	 * who was read-only): bring the shadow up to date before the next check. Otherwise the
	 * shadow already holds everything (each checked update was tried on it first), and the
	 * catch-up, which encodes the document's whole delete set, is skipped.
	 */
	shadowBehind = true;
	/** Counts shadow copies: an update checked on an earlier one is not in the current one. */
	shadowGen = 0;
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
		this.doc.on('afterTransaction', (tr: Y.Transaction) => {
			if (tr.origin !== ORIGIN_CHECKED) this.shadowBehind = true;
		});
		// The server is not a participant: no presence of its own.
		this.awareness.setLocalState(null);
	}

	noteSnapshot(seq: string) {
		if (BigInt(seq) <= BigInt(this.snapshotSeq)) return;
		this.snapshotSeq = seq;
		const s = BigInt(seq);
		for (const x of this.seen) if (BigInt(x) <= s) this.seen.delete(x);
	}

	/** Forgets the shadow copy: it may hold a change the room will never get. */
	dropShadow() {
		this.shadow?.destroy();
		this.shadow = null;
		this.shadowGen++;
	}

	/** The member whose presence uses this client id, if any. */
	ownerOfPresence(clientId: number): string | null {
		for (const [id, m] of this.members) if (m.clientIds.has(clientId)) return id;
		return null;
	}

	destroy() {
		this.awareness.destroy();
		this.shadow?.destroy();
		this.doc.destroy();
	}
}
