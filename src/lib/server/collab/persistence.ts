// Storage of board documents: a compacted snapshot on the board row plus an append-only log of
// the updates accepted since (board_update). Every process may append and compact; the database
// is the one source of truth, a process's in-memory document is a cache of it.
import type pg from 'pg';
import { sql } from 'kysely';
import * as Y from 'yjs';
import type { DB } from '../db/index';
import { writablePairs } from '../../survey/board-access';

/** 'role:status' pairs that may write (the board-access policy, src/lib/survey/board-access.ts). */
const WRITABLE_PAIRS = writablePairs();

export interface PendingUpdate {
	boardId: string;
	organisationId: string;
	userId: string;
	/** The socket's session: an ended session stops writing at once. */
	sessionId: string;
	update: Uint8Array;
}

function toBuffer(u: Uint8Array): Buffer {
	return Buffer.isBuffer(u) ? u : Buffer.from(u.buffer, u.byteOffset, u.byteLength);
}

/** What appendUpdates needs: a pg Pool or Client (named statements are prepared per connection). */
export interface Queryable {
	query<R extends pg.QueryResultRow>(config: pg.QueryConfig): Promise<pg.QueryResult<R>>;
}

// The bodies travel as one binary parameter ($2, sliced by $7 offsets and $8 lengths): an array
// of bytea would go as text, every byte as two hex digits, built and escaped on the event loop
// and parsed again by PostgreSQL.
const APPEND_SQL = `
	with v as (
		select v.board_id, substring($2::bytea from v.off for v.len) as body, v.user_id, v.session_id, v.organisation_id, v.idx
		from unnest($1::uuid[], $7::int[], $8::int[], $3::text[], $4::text[], $5::uuid[])
			with ordinality as v(board_id, off, len, user_id, session_id, organisation_id, idx)
	), ok as materialized (
		select v.idx, v.board_id, v.body, v.user_id, nextval('board_update_seq_seq') as seq
		from v
		join board b on b.id = v.board_id and b.organisation_id = v.organisation_id
		join survey s on s.organisation_id = b.organisation_id and s.id = b.survey_id
		join member m on m.organisation_id = b.organisation_id and m.user_id = v.user_id
		join user_session us on us.id = v.session_id and us.user_id = v.user_id
			and us.organisation_id = b.organisation_id and us.expires_at > now()
		where b.frozen_at is null and s.archived_at is null
			and (m.role || ':' || s.status) = any($6::text[])
		-- Waits for an approval that holds the board row (FOR UPDATE) and re-checks frozen_at
		-- against what it committed, so nothing lands on a board after its approval.
		for key share of b
	), ins as (
		insert into board_update (seq, board_id, update, user_id)
		select seq, board_id, body, user_id from ok order by seq
	)
	select idx::text as idx, seq::text as seq from ok`;

/**
 * Appends updates in one statement, each only if, at this moment, the board belongs to the
 * organisation, is not frozen, its survey is not archived, the session is live and the board-access
 * policy lets the member's role write in the survey's status (both read afresh for every update).
 * The session is checked in this SQL rather than through auth/liveness.ts on purpose: it has to
 * hold at the moment of the write, in the same statement, not a query earlier.
 * Returns, per update, its seq when stored or null when refused. The statement is its own
 * transaction: when the promise resolves the rows are committed. It runs as a named (prepared)
 * statement: planning this join costs more than running it.
 */
export async function appendUpdates(db: Queryable, items: PendingUpdate[]): Promise<(string | null)[]> {
	if (items.length === 0) return [];
	const offsets: number[] = [];
	const lengths: number[] = [];
	let at = 1;
	for (const i of items) {
		offsets.push(at);
		lengths.push(i.update.byteLength);
		at += i.update.byteLength;
	}
	const bodies = items.length === 1 ? toBuffer(items[0].update) : Buffer.concat(items.map((i) => toBuffer(i.update)));
	const r = await db.query<{ idx: string; seq: string }>({
		name: 'spotface_append_board_updates_v2',
		text: APPEND_SQL,
		values: [
			items.map((i) => i.boardId),
			bodies,
			items.map((i) => i.userId),
			items.map((i) => i.sessionId),
			items.map((i) => i.organisationId),
			WRITABLE_PAIRS,
			offsets,
			lengths
		]
	});
	const out: (string | null)[] = items.map(() => null);
	for (const row of r.rows) out[Number(row.idx) - 1] = row.seq;
	return out;
}

// Loading a board's stored document (snapshot + log) is a repository of its own, shared with
// the pages and exports: src/lib/server/db/board-document.ts.
export { loadInto, readDocument, type LoadedBoard } from '../db/board-document';

export interface CompactionResult {
	merged: number;
	snapshotSeq: string;
	snapshotBytes: number;
}

/**
 * Folds the log into the snapshot with Y.mergeUpdates and deletes exactly the rows folded in.
 * Rows committed meanwhile (whatever their seq) stay in the log for the next round. The board
 * row lock (FOR NO KEY UPDATE) serialises compactions without blocking appends.
 */
export async function compact(db: DB, boardId: string): Promise<CompactionResult | null> {
	return db.transaction().execute(async (trx) => {
		const board = await trx
			.selectFrom('board')
			.select(['snapshot', 'snapshot_seq'])
			.where('id', '=', boardId)
			.forNoKeyUpdate()
			.executeTakeFirst();
		if (!board) return null;
		const rows = await trx.selectFrom('board_update').select(['seq', 'update']).where('board_id', '=', boardId).orderBy('seq').execute();
		if (rows.length === 0) {
			return { merged: 0, snapshotSeq: board.snapshot_seq, snapshotBytes: board.snapshot?.byteLength ?? 0 };
		}
		const parts = [...(board.snapshot ? [board.snapshot] : []), ...rows.map((r) => r.update)];
		let merged: Uint8Array;
		try {
			merged = Y.mergeUpdates(parts);
		} catch (e) {
			// A row that cannot be merged is dropped from the snapshot (it could never be applied
			// either); what can be applied is kept, through a document.
			console.error(`[collab] board ${boardId}: merge failed (${(e as Error).message}); rebuilding through a document`);
			const doc = new Y.Doc();
			for (const p of parts) {
				try {
					Y.applyUpdate(doc, p);
				} catch {
					/* skipped, logged above */
				}
			}
			merged = Y.encodeStateAsUpdate(doc);
			doc.destroy();
		}
		let maxSeq = BigInt(board.snapshot_seq);
		for (const r of rows) if (BigInt(r.seq) > maxSeq) maxSeq = BigInt(r.seq);
		await trx
			.updateTable('board')
			.set({ snapshot: Buffer.from(merged), snapshot_seq: maxSeq.toString() })
			.where('id', '=', boardId)
			.execute();
		await trx
			.deleteFrom('board_update')
			.where('board_id', '=', boardId)
			.where(
				'seq',
				'in',
				rows.map((r) => r.seq)
			)
			.execute();
		return { merged: rows.length, snapshotSeq: maxSeq.toString(), snapshotBytes: merged.byteLength };
	});
}

/**
 * Log rows of a board not in `seen` and older than `minAgeMs` (younger ones are most likely
 * still on their way through the adapter), and the snapshot when it moved past `snapshotSeq`.
 */
export async function readMissing(db: DB, boardId: string, seen: Set<string>, snapshotSeq: string, minAgeMs = 1000) {
	return db
		.transaction()
		.setIsolationLevel('repeatable read')
		.execute(async (trx) => {
			const board = await trx.selectFrom('board').select(['snapshot_seq']).where('id', '=', boardId).executeTakeFirst();
			if (!board) return null;
			const snapshot =
				BigInt(board.snapshot_seq) > BigInt(snapshotSeq)
					? ((await trx.selectFrom('board').select(['snapshot']).where('id', '=', boardId).executeTakeFirst())?.snapshot ?? null)
					: null;
			const seqs = await trx
				.selectFrom('board_update')
				.select('seq')
				.where('board_id', '=', boardId)
				.where('created_at', '<', sql<Date>`now() - make_interval(secs => ${minAgeMs / 1000})`)
				.execute();
			const unseen = seqs.map((r) => r.seq).filter((s) => !seen.has(s));
			const rows = unseen.length
				? await trx.selectFrom('board_update').select(['seq', 'update']).where('seq', 'in', unseen).orderBy('seq').execute()
				: [];
			return { snapshotSeq: board.snapshot_seq, snapshot, rows };
		});
}
