// Session sweep: a socket lives on after its session ends (sign-out, password reset, removal
// from the organisation). Writes are refused at once by the append's own check; this sweep,
// every `sessionCheckMs`, also closes the sockets of ended sessions so they stop reading.
import type { CollabContext } from './context';
import { closeSocket } from './context';
import type { RoomMember } from './room';
import { liveSessionIds } from '../auth/liveness';

export async function sweepSessions(ctx: CollabContext) {
	const bySession = new Map<string, RoomMember[]>();
	for (const room of ctx.rooms.values()) {
		for (const m of room.members.values()) {
			const list = bySession.get(m.viewer.sessionId) ?? [];
			list.push(m);
			bySession.set(m.viewer.sessionId, list);
		}
	}
	if (bySession.size === 0 || ctx.closed) return;
	try {
		const alive = await liveSessionIds(ctx.db, [...bySession.keys()]);
		for (const [id, list] of bySession) if (!alive.has(id)) for (const m of list) closeSocket(ctx, m.socket, 'the session has ended');
	} catch (e) {
		ctx.log.error(`[collab] session sweep failed: ${(e as Error).message}`);
	}
}
