// The live board on socket.io, composed of hooks with one job each (hooks/*.ts):
//
//   authenticate (join: board access) → load (snapshot + log into the room) → check (limits,
//   budgets, board policy, client ids) → store (append, group-committed) → broadcast (room here,
//   other processes) → acknowledge (the sender's answer) … unload (grace period, compaction).
//
// Beside the pipeline: presence.ts (sanitised presence and its relay), catch-up.ts (log re-read
// across processes), session-sweep.ts (closes sockets of ended sessions), board-state.ts
// (approval, freezing, role changes announced by any process). The room's state is room.ts;
// the frames, shared with the client, are src/lib/board/sync/frames.ts.
import type { Server } from 'socket.io';
import type pg from 'pg';
import type { DB } from '../db/index';
import { binaryMessageSchema } from '../../schemas/collab';
import { EVENT_JOIN, EVENT_MESSAGE, type MessageAck } from '../../board/sync/protocol';
import type { CollabOptions } from './config';
import { closeSocket, who, type CollabContext, type CollabLog } from './context';
import { ORIGIN_LEAVE, type BoardRoom } from './room';
import { ClusterView } from './cluster';
import { UpdateWriter } from './writer';
import { TokenBucket } from './rate-limit';
import { ByteBucket } from './budget';
import { removeAwarenessStates } from 'y-protocols/awareness';
import { relayPresence } from './presence';
import { catchUp } from './catch-up';
import { sweepSessions } from './session-sweep';
import { listenForBoardState } from './board-state';
import { join } from './hooks/authenticate';
import { receive } from './hooks/receive';
import { listenForRelayedUpdates } from './hooks/broadcast';
import { forgetSocket } from './hooks/acknowledge';
import { runCompaction, scheduleUnload } from './hooks/unload';

export interface CollabDeps {
	io: Server;
	/** The app's database (the same Kysely instance the pages use). */
	db: DB;
	/** The live board's own pool: the writer's appends and the board-state LISTEN connection. */
	pool: pg.Pool;
	options: CollabOptions;
	log?: CollabLog;
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

export function attachCollab({ io, db, pool, options, log = console }: CollabDeps): CollabServer {
	const ctx: CollabContext = {
		io,
		db,
		pool,
		options,
		log,
		rooms: new Map<string, BoardRoom>(),
		writer: new UpdateWriter(pool, undefined, undefined, undefined, undefined, { minGapMs: options.commitIntervalMs }),
		cluster: new ClusterView(io, options.cluster),
		closed: false
	};
	const messageSchema = binaryMessageSchema(options.maxMessageBytes);

	io.on('connection', (socket) => {
		const messages = new TokenBucket(options.messagesPerSecond, options.messageBurst);
		const bytes = new ByteBucket(options.socketBytesPerSecond, options.socketByteBurst);

		socket.use((_packet, next) => {
			if (messages.take()) return next();
			closeSocket(ctx, socket, `more than ${options.messagesPerSecond} messages per second (burst ${options.messageBurst})`);
		});

		socket.on(EVENT_JOIN, (payload: unknown, ack: unknown) => void join(ctx, socket, bytes, payload, ack));

		socket.on(EVENT_MESSAGE, (data: unknown, ack: unknown) => {
			const reply = typeof ack === 'function' ? (ack as (a: MessageAck) => void) : () => {};
			const parsed = messageSchema.safeParse(data);
			if (!parsed.success) return closeSocket(ctx, socket, `bad message: ${parsed.error.issues[0]?.message ?? 'invalid'}`);
			const room = socket.data.boardId ? ctx.rooms.get(socket.data.boardId as string) : undefined;
			const member = room?.members.get(socket.id);
			if (!room || !member || room.state !== 'ready') return closeSocket(ctx, socket, 'message before joining a board');
			receive(ctx, socket, room, member, parsed.data, reply);
		});

		socket.on('disconnect', (reason) => {
			const boardId = socket.data.boardId as string | undefined;
			if (!boardId) return;
			const room = ctx.rooms.get(boardId);
			const member = room?.members.get(socket.id);
			if (!room || !member) return;
			room.members.delete(socket.id);
			if (reason !== 'client namespace disconnect' && reason !== 'server namespace disconnect') {
				log.info(`[collab] ${who(socket)} left: ${reason}`);
			}
			forgetSocket(ctx, socket.id);
			if (member.clientIds.size) removeAwarenessStates(room.awareness, [...member.clientIds], ORIGIN_LEAVE);
			if (room.members.size === 0 && !ctx.closed) scheduleUnload(ctx, room);
		});
	});

	if (options.cluster) {
		listenForRelayedUpdates(ctx);
		relayPresence(ctx);
	}
	const every = (ms: number, job: () => Promise<void>) => {
		if (ms <= 0) return null;
		const t = setInterval(() => void job(), ms);
		t.unref?.();
		return t;
	};
	const catchUpTimer = every(options.catchUpMs, () => catchUp(ctx));
	const sweepTimer = every(options.sessionCheckMs, () => sweepSessions(ctx));
	const listener = listenForBoardState(ctx);

	return {
		stats() {
			let sockets = 0;
			for (const r of ctx.rooms.values()) sockets += r.members.size;
			const { writer } = ctx;
			return { rooms: ctx.rooms.size, sockets, pendingWrites: writer.pending, writer: writer.stats, storeMs: writer.batchTimes() };
		},
		async close() {
			ctx.closed = true;
			if (catchUpTimer) clearInterval(catchUpTimer);
			if (sweepTimer) clearInterval(sweepTimer);
			ctx.cluster.close();
			await listener.close();
			await ctx.writer.close();
			// Fold what was written into snapshots; not needed for safety (the log is durable).
			await Promise.all(
				[...ctx.rooms.values()].map(async (room) => {
					if (room.unloadTimer) clearTimeout(room.unloadTimer);
					if (room.state === 'ready') await runCompaction(ctx, room);
				})
			);
		}
	};
}
