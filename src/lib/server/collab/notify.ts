// How the rest of the app tells the live board that a board's state changed (approved, frozen,
// reopened, a member's role changed): a NOTIFY that every server process LISTENs to. Inside a
// transaction the notification is delivered on commit, so send it from the transaction that
// made the change.
import { sql } from 'kysely';
import type { QueryExecutorProvider } from 'kysely';

export const BOARD_CHANNEL = 'spotface_board';

export async function announceBoardChange(db: QueryExecutorProvider, boardIds: string[]) {
	for (const id of boardIds) await sql`select pg_notify(${BOARD_CHANNEL}, ${id})`.execute(db);
}
