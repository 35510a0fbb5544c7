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

/**
 * Applies the stored state of a board to `doc`: the snapshot, then every row still in the log.
 * Both are read in one repeatable-read transaction so a compaction in between cannot hide rows.
 */
export async function loadInto(db: DB, boardId: string, doc: Y.Doc, origin: unknown = 'storage'): Promise<LoadedBoard | null> {
	const read = await db
		.transaction()
		.setIsolationLevel('repeatable read')
		.execute(async (trx) => {
			const board = await trx.selectFrom('board').select(['snapshot', 'snapshot_seq']).where('id', '=', boardId).executeTakeFirst();
			if (!board) return null;
			const rows = await trx.selectFrom('board_update').select(['seq', 'update']).where('board_id', '=', boardId).orderBy('seq').execute();
			return { board, rows };
		});
	if (!read) return null;
	const bad: string[] = [];
	if (read.board.snapshot) Y.applyUpdate(doc, read.board.snapshot, origin);
	for (const row of read.rows) {
		try {
			Y.applyUpdate(doc, row.update, origin);
		} catch (e) {
			bad.push(row.seq);
			console.error(`[collab] board ${boardId}: stored update ${row.seq} cannot be applied: ${(e as Error).message}`);
		}
	}
	return { seqs: read.rows.map((r) => r.seq), snapshotSeq: read.board.snapshot_seq, bad };
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
