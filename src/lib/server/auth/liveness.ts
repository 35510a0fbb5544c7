// Whether sessions are still live (not signed out, not expired), for code outside a request
// that holds session ids: the live board's sockets (join, state changes, the session sweep).
// The one other reader of lucia's table is the live board's append statement
// (collab/persistence.ts), which must check the session in the same statement as the write.
import type { DB } from '../db/index';

/** The ids among `ids` whose session is still live. */
export async function liveSessionIds(db: DB, ids: readonly string[]): Promise<Set<string>> {
	if (ids.length === 0) return new Set();
	const rows = await db
		.selectFrom('user_session')
		.select('id')
		.where('id', 'in', [...ids])
		.where('expires_at', '>', new Date())
		.execute();
	return new Set(rows.map((r) => r.id));
}

/** Whether this session is live and still belongs to this user in this organisation. */
export async function isSessionLive(db: DB, s: { sessionId: string; userId: string; organisationId: string }): Promise<boolean> {
	const row = await db
		.selectFrom('user_session')
		.select('id')
		.where('id', '=', s.sessionId)
		.where('user_id', '=', s.userId)
		.where('organisation_id', '=', s.organisationId)
		.where('expires_at', '>', new Date())
		.executeTakeFirst();
	return row !== undefined;
}
