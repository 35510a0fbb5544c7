// Hook "unload": once the last connection of a board has been gone for the grace period, fold
// its log into the snapshot and drop the document. Compaction also runs every
// `compactEvery` stored updates while the board is open.
import type { CollabContext } from '../context';
import { closeSocket } from '../context';
import type { BoardRoom } from '../room';
import { compact } from '../persistence';

export function scheduleUnload(ctx: CollabContext, room: BoardRoom) {
	if (room.unloadTimer) clearTimeout(room.unloadTimer);
	room.unloadTimer = setTimeout(() => void unload(ctx, room), ctx.options.unloadGraceMs);
	room.unloadTimer.unref?.();
}

/** A join arrived in time: the board stays open. */
export function cancelUnload(room: BoardRoom) {
	if (!room.unloadTimer) return;
	clearTimeout(room.unloadTimer);
	room.unloadTimer = null;
}

async function unload(ctx: CollabContext, room: BoardRoom) {
	room.unloadTimer = null;
	if (room.members.size > 0 || room.state !== 'ready') return;
	room.state = 'unloading';
	room.unloaded = (async () => {
		try {
			await room.compacting;
			await runCompaction(ctx, room);
		} finally {
			room.destroy();
			room.state = 'gone';
			if (ctx.rooms.get(room.id) === room) ctx.rooms.delete(room.id);
			ctx.log.info(`[collab] unloaded board ${room.id} (${ctx.rooms.size} open)`);
		}
	})();
	await room.unloaded;
}

export async function runCompaction(ctx: CollabContext, room: BoardRoom) {
	try {
		const r = await compact(ctx.db, room.id);
		if (r && r.merged > 0) {
			room.noteSnapshot(r.snapshotSeq);
			ctx.log.info(`[collab] compacted board ${room.id}: ${r.merged} update(s) into a ${r.snapshotBytes}-byte snapshot`);
		}
	} catch (e) {
		// The log is intact; the next round tries again.
		ctx.log.error(`[collab] compacting board ${room.id} failed: ${(e as Error).message}`);
	}
}

/** Counts a stored update and compacts once enough have gathered. */
export function noteStored(ctx: CollabContext, room: BoardRoom) {
	room.storedSinceCompaction++;
	if (room.storedSinceCompaction < ctx.options.compactEvery || room.compacting) return;
	room.storedSinceCompaction = 0;
	room.compacting = runCompaction(ctx, room).finally(() => {
		room.compacting = null;
	});
}

/**
 * The room holds a change that storage refused after it was shown (the member's access ended
 * between the check and the commit): drop the room and close its sockets. They reconnect to a
 * copy read from storage; a peer's copy of the refused change is then refused as written under
 * another member's id, and its provider continues on the server's state.
 */
export function resetRoom(ctx: CollabContext, room: BoardRoom, reason: string) {
	if (room.state !== 'ready') return;
	room.state = 'gone';
	room.unloaded = Promise.resolve();
	if (room.unloadTimer) clearTimeout(room.unloadTimer);
	if (ctx.rooms.get(room.id) === room) ctx.rooms.delete(room.id);
	const sockets = [...room.members.values()].map((m) => m.socket);
	room.members.clear();
	for (const s of sockets) closeSocket(ctx, s, reason);
	room.destroy();
	ctx.log.warn(`[collab] board ${room.id} reloaded from storage: ${reason}`);
}
