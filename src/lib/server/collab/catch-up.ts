// Cluster catch-up: heals a lost cross-process notification. Every `catchUpMs`, while other
// processes share the database, each open board re-reads its log for rows it has not applied
// and sends what was missing to its sockets.
import * as Y from 'yjs';
import { EVENT_MESSAGE, roomOf } from '../../board/sync/protocol';
import { syncUpdateFrame } from '../../board/sync/frames';
import type { CollabContext } from './context';
import { ORIGIN_CATCH_UP } from './room';
import { readMissing } from './persistence';

export async function catchUp(ctx: CollabContext) {
	if (ctx.closed || !ctx.cluster.enabled || (await ctx.cluster.refresh()) === 0) return;
	for (const room of ctx.rooms.values()) {
		if (room.state !== 'ready' || room.members.size === 0) continue;
		try {
			const missing = await readMissing(ctx.db, room.id, room.seen, room.snapshotSeq);
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
				ctx.log.warn(`[collab] board ${room.id}: caught up ${fresh.length} change(s) missed from another process`);
				ctx.io.local.to(roomOf(room.id)).emit(EVENT_MESSAGE, syncUpdateFrame(Y.mergeUpdates(fresh)));
			}
		} catch (e) {
			ctx.log.error(`[collab] catch-up of board ${room.id} failed: ${(e as Error).message}`);
		}
	}
}
