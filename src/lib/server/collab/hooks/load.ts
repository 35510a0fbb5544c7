// Hook "load": opens a board in this process on its first join: the snapshot and the log since
// into a Y.Doc (persistence.ts), relayed updates that came meanwhile, then presence from the
// other processes. Every later join waits for the same load.
import type { CollabContext } from '../context';
import { BoardRoom, ORIGIN_STORAGE } from '../room';
import { loadInto } from '../../db/board-document';
import { RELAY_PRESENCE_REQUEST } from '../cluster';
import { wirePresence } from '../presence';
import { applyRelayed } from './broadcast';

export async function openRoom(ctx: CollabContext, boardId: string): Promise<BoardRoom> {
	const { rooms, log } = ctx;
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
		const room = new BoardRoom(boardId, ctx.options);
		rooms.set(boardId, room);
		wirePresence(ctx, room);
		room.ready = (async () => {
			const started = performance.now();
			const loaded = await loadInto(ctx.db, boardId, room.doc, ORIGIN_STORAGE);
			if (!loaded) throw new Error(`board ${boardId} not found`);
			for (const s of loaded.seqs) room.seen.add(s);
			room.snapshotSeq = loaded.snapshotSeq;
			for (const { seq, update } of room.early.splice(0)) applyRelayed(ctx, room, seq, update);
			room.size.measure(room.doc);
			room.state = 'ready';
			ctx.cluster.toOthers(() => ctx.io.serverSideEmit(RELAY_PRESENCE_REQUEST, boardId));
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
