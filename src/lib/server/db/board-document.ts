// A board's stored document: the snapshot on the board row plus the log of updates since
// (board_update), read together. Used by the live board to open a room (collab/hooks/load.ts)
// and by pages, exports and review to read a board's content outside a room.
import * as Y from 'yjs';
import type { DB } from './index';

export interface LoadedBoard {
	/** seq of every log row applied (the snapshot's rows are not listed). */
	seqs: string[];
	snapshotSeq: string;
	/** Rows that could not be applied (logged, skipped). */
	bad: string[];
}

/** What storage holds of a board: its snapshot (null before the first compaction) and its log. */
export interface StoredBoard {
	snapshot: Uint8Array | null;
	snapshotSeq: string;
	rows: Array<{ seq: string; update: Uint8Array }>;
}

/**
 * Reads a board's snapshot and every row still in its log in one repeatable-read transaction,
 * so a compaction in between cannot hide rows. `organisationId` (and `surveyId`) scope the
 * board: another organisation's board reads as null.
 */
export async function readStored(
	db: DB,
	boardId: string,
	scope: { organisationId: string; surveyId?: string } | null = null
): Promise<StoredBoard | null> {
	return db
		.transaction()
		.setIsolationLevel('repeatable read')
		.execute(async (trx) => {
			let q = trx.selectFrom('board').select(['snapshot', 'snapshot_seq']).where('id', '=', boardId);
			if (scope) q = q.where('organisation_id', '=', scope.organisationId);
			if (scope?.surveyId) q = q.where('survey_id', '=', scope.surveyId);
			const board = await q.executeTakeFirst();
			if (!board) return null;
			const rows = await trx.selectFrom('board_update').select(['seq', 'update']).where('board_id', '=', boardId).orderBy('seq').execute();
			return { snapshot: board.snapshot, snapshotSeq: board.snapshot_seq, rows };
		});
}

/**
 * Applies the stored state of a board to `doc`: the snapshot, then every row still in the log
 * (read together by `readStored`).
 */
export async function loadInto(db: DB, boardId: string, doc: Y.Doc, origin: unknown = 'storage'): Promise<LoadedBoard | null> {
	const read = await readStored(db, boardId);
	if (!read) return null;
	const bad: string[] = [];
	if (read.snapshot) Y.applyUpdate(doc, read.snapshot, origin);
	for (const row of read.rows) {
		try {
			Y.applyUpdate(doc, row.update, origin);
		} catch (e) {
			bad.push(row.seq);
			console.error(`[collab] board ${boardId}: stored update ${row.seq} cannot be applied: ${(e as Error).message}`);
		}
	}
	return { seqs: read.rows.map((r) => r.seq), snapshotSeq: read.snapshotSeq, bad };
}

/** The whole stored document of a board as one update (snapshot and log merged), or null. */
export async function readDocument(db: DB, boardId: string): Promise<Uint8Array | null> {
	const doc = new Y.Doc({ gc: true });
	try {
		const loaded = await loadInto(db, boardId, doc);
		return loaded ? Y.encodeStateAsUpdate(doc) : null;
	} finally {
		doc.destroy();
	}
}
