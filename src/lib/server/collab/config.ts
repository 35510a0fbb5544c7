// Limits and timings of the live board. The entry point reads them from the environment once
// (collabOptionsFromEnv) and passes them in; nothing here reads process.env by itself.

export interface CollabOptions {
	/** Largest y-protocols message a socket may send; a bigger one closes that socket. */
	maxMessageBytes: number;
	/** Sustained messages per second per socket (token bucket refill rate). */
	messagesPerSecond: number;
	/** Messages a socket may send in a burst before the rate applies. */
	messageBurst: number;
	/** A board with no connections stays in memory this long before it is compacted and unloaded. */
	unloadGraceMs: number;
	/** Fold the update log into the snapshot after this many updates stored by one process. */
	compactEvery: number;
	/**
	 * With other server processes present, re-read the log of each open board this often, in case
	 * a cross-process notification was lost (a dropped LISTEN connection). 0 turns it off.
	 */
	catchUpMs: number;
	/** Close sockets whose session has ended (sign-out, reset, removal) this often. 0 turns it off. */
	sessionCheckMs: number;
	/**
	 * Least time between the starts of two commits of board updates. Under load, updates that
	 * arrive in between share the next commit: fewer, larger commits cost the server and
	 * PostgreSQL far less per update, and peers see an update before it is committed anyway.
	 * On a quiet board nothing waits (a commit starts at once when the last began long enough
	 * ago). 0: every update is written as soon as a connection is free.
	 */
	commitIntervalMs: number;
	/** Keep rooms in step across processes through the socket.io PostgreSQL adapter. */
	cluster: boolean;
	/** Largest single document update; a bigger one is refused (not stored) with the reason. */
	maxUpdateBytes: number;
	/** A board's document may not grow beyond this (encoded); growth beyond is refused. */
	maxDocumentBytes: number;
	/** Bytes of updates and presence per second a socket may send on average... */
	socketBytesPerSecond: number;
	/** ...and in a burst. Over it, updates are answered "not stored yet, send again later". */
	socketByteBurst: number;
	/** The same for all sockets of one board together (per server process). */
	boardBytesPerSecond: number;
	boardByteBurst: number;
	/** Counts of items a board may hold (the board policy refuses growth beyond them). */
	boardLimits: { maxPoints: number; maxRoutes: number; maxZones: number };
}

export const DEFAULT_COLLAB_OPTIONS: CollabOptions = {
	maxMessageBytes: 1_000_000,
	messagesPerSecond: 100,
	messageBurst: 300,
	unloadGraceMs: 30_000,
	compactEvery: 200,
	catchUpMs: 10_000,
	sessionCheckMs: 30_000,
	commitIntervalMs: 20,
	cluster: true,
	// A real board (1,000 points with notes, routes and zones) encodes to a few hundred KB, and
	// a technician's edits come to a few KB per second at most (a point dragged at 60 frames a
	// second is about 6 KB/s). A day of offline work arrives as one update, well under 512 KB,
	// and passes on a quiet connection whatever its size (see ByteBucket). 8 MB is twenty
	// times the largest real board; a board in memory takes several times its encoded size.
	// Per board, four busy people fit in 128 KB/s; a flood from one connection is held to
	// 64 KB/s, where it costs the server little and other boards nothing.
	maxUpdateBytes: 512 * 1024,
	maxDocumentBytes: 8 * 1024 * 1024,
	socketBytesPerSecond: 64 * 1024,
	socketByteBurst: 256 * 1024,
	boardBytesPerSecond: 128 * 1024,
	boardByteBurst: 512 * 1024,
	// A machine photo holds a handful of points; 2,000 leaves room for a big drawing of a whole
	// skid while keeping a board that every tablet can draw.
	boardLimits: { maxPoints: 2000, maxRoutes: 1000, maxZones: 500 }
};

function int(raw: string | undefined, fallback: number, min: number, name: string) {
	if (raw === undefined || raw === '') return fallback;
	const n = Number(raw);
	if (!Number.isInteger(n) || n < min) throw new Error(`${name} must be a whole number ≥ ${min} (got "${raw}")`);
	return n;
}

export function collabOptionsFromEnv(env: Record<string, string | undefined>): CollabOptions {
	const d = DEFAULT_COLLAB_OPTIONS;
	return {
		maxMessageBytes: int(env.COLLAB_MAX_MESSAGE_BYTES, d.maxMessageBytes, 1024, 'COLLAB_MAX_MESSAGE_BYTES'),
		messagesPerSecond: int(env.COLLAB_MESSAGES_PER_SECOND, d.messagesPerSecond, 1, 'COLLAB_MESSAGES_PER_SECOND'),
		messageBurst: int(env.COLLAB_MESSAGE_BURST, d.messageBurst, 1, 'COLLAB_MESSAGE_BURST'),
		unloadGraceMs: int(env.COLLAB_UNLOAD_GRACE_MS, d.unloadGraceMs, 0, 'COLLAB_UNLOAD_GRACE_MS'),
		compactEvery: int(env.COLLAB_COMPACT_EVERY, d.compactEvery, 1, 'COLLAB_COMPACT_EVERY'),
		catchUpMs: int(env.COLLAB_CATCH_UP_MS, d.catchUpMs, 0, 'COLLAB_CATCH_UP_MS'),
		sessionCheckMs: int(env.COLLAB_SESSION_CHECK_MS, d.sessionCheckMs, 0, 'COLLAB_SESSION_CHECK_MS'),
		commitIntervalMs: int(env.COLLAB_COMMIT_INTERVAL_MS, d.commitIntervalMs, 0, 'COLLAB_COMMIT_INTERVAL_MS'),
		cluster: env.COLLAB_CLUSTER === undefined ? d.cluster : !['0', 'false', 'off'].includes(env.COLLAB_CLUSTER),
		maxUpdateBytes: int(env.COLLAB_MAX_UPDATE_BYTES, d.maxUpdateBytes, 1024, 'COLLAB_MAX_UPDATE_BYTES'),
		maxDocumentBytes: int(env.COLLAB_MAX_DOCUMENT_BYTES, d.maxDocumentBytes, 1024, 'COLLAB_MAX_DOCUMENT_BYTES'),
		socketBytesPerSecond: int(env.COLLAB_SOCKET_BYTES_PER_SECOND, d.socketBytesPerSecond, 1024, 'COLLAB_SOCKET_BYTES_PER_SECOND'),
		socketByteBurst: int(env.COLLAB_SOCKET_BYTE_BURST, d.socketByteBurst, 1024, 'COLLAB_SOCKET_BYTE_BURST'),
		boardBytesPerSecond: int(env.COLLAB_BOARD_BYTES_PER_SECOND, d.boardBytesPerSecond, 1024, 'COLLAB_BOARD_BYTES_PER_SECOND'),
		boardByteBurst: int(env.COLLAB_BOARD_BYTE_BURST, d.boardByteBurst, 1024, 'COLLAB_BOARD_BYTE_BURST'),
		boardLimits: {
			maxPoints: int(env.COLLAB_MAX_POINTS, d.boardLimits.maxPoints, 1, 'COLLAB_MAX_POINTS'),
			maxRoutes: int(env.COLLAB_MAX_ROUTES, d.boardLimits.maxRoutes, 1, 'COLLAB_MAX_ROUTES'),
			maxZones: int(env.COLLAB_MAX_ZONES, d.boardLimits.maxZones, 1, 'COLLAB_MAX_ZONES')
		}
	};
}
