// What every hook of the live board shares in one process: socket.io, the database, the options,
// the open rooms, the writer and the view of the other processes. Built once by server.ts.
import type { Server, Socket } from 'socket.io';
import type pg from 'pg';
import type { DB } from '../db/index';
import { EVENT_CLOSED } from '../../board/sync/protocol';
import type { BoardViewer } from './access';
import type { BoardRoom } from './room';
import type { CollabOptions } from './config';
import type { UpdateWriter } from './writer';
import type { ClusterView } from './cluster';

export type CollabLog = Pick<Console, 'info' | 'warn' | 'error'>;

export interface CollabContext {
	io: Server;
	db: DB;
	/** The live board's own pool: the writer's appends and the board-state LISTEN connection. */
	pool: pg.Pool;
	options: CollabOptions;
	log: CollabLog;
	rooms: Map<string, BoardRoom>;
	writer: UpdateWriter;
	cluster: ClusterView;
	/** Set once the server is closing: no new joins, no timers' work. */
	closed: boolean;
}

/** A socket in words for the log. */
export function who(socket: Socket) {
	const v = socket.data.viewer as BoardViewer | undefined;
	return `socket ${socket.id} (user ${v?.userId ?? '?'}${socket.data.boardId ? `, board ${socket.data.boardId}` : ''})`;
}

/** Closes one socket with a logged reason; the document and everyone else carry on. */
export function closeSocket(ctx: CollabContext, socket: Socket, reason: string) {
	if (!socket.connected) return;
	ctx.log.warn(`[collab] closing ${who(socket)}: ${reason}`);
	socket.emit(EVENT_CLOSED, { reason });
	socket.disconnect(true);
}
