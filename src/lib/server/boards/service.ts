// Changes to a board's state that open live boards must hear of (freezing, unfreezing, a survey
// moving through review): made in one transaction with the announcement, which every server
// process receives when it commits (collab/notify.ts). Repositories in db/ only read and write
// rows; this service is what tells the live board.
import type { DB } from '../db/index';
import * as boards from '../db/boards';
import { announceBoardChange } from '../collab/notify';

/** Tells every process's open boards that these boards' state changed; call it inside the transaction that changed it. */
export async function announceBoardState(trx: DB, boardIds: string[]) {
	await announceBoardChange(trx, boardIds);
}

/** Freezes one board (read-only from now on); open boards hear of it on commit. */
export async function freezeBoard(db: DB, organisationId: string, id: string): Promise<boolean> {
	return db.transaction().execute(async (trx) => {
		if (!(await boards.freeze(trx, organisationId, id))) return false;
		await announceBoardState(trx, [id]);
		return true;
	});
}

/** Lifts a freeze (e.g. when a revision is reopened); open boards hear of it on commit. */
export async function unfreezeBoard(db: DB, organisationId: string, id: string): Promise<boolean> {
	return db.transaction().execute(async (trx) => {
		if (!(await boards.unfreeze(trx, organisationId, id))) return false;
		await announceBoardState(trx, [id]);
		return true;
	});
}
