// Client ids belong to the member who introduced them. Every struct in a Yjs update is stamped
// with a client id; a member may write only under ids they introduced on this board, so a
// change can never be made to look like someone else's. An id that the board already holds but
// nobody has claimed (written before ownership was recorded, or by the demo seed) is closed: a
// browser that still has offline work under such an id gets it set aside and written again
// under a fresh id by the board's refusal handling.
import * as Y from 'yjs';
import { sql } from 'kysely';
import type { DB } from '../db/index';
import type { DecodedUpdate } from './update-check';

/** The client ids under which an update writes new structs (deletions name others' ids, legitimately). */
export function structClientIds(d: DecodedUpdate): Set<number> {
	const out = new Set<number>();
	for (const s of d.structs) if (!(s instanceof Y.Skip)) out.add(s.id.client);
	return out;
}

export type OwnershipVerdict = { ok: true; claim: number[] } | { ok: false; clientId: number; reason: string };

export const REASON_FORGED =
	'This change was written under another person’s editing id and cannot be saved. Reload the board; your work is kept on this device.';

/**
 * Decides whether `userId` may write under `ids` on a board whose document already holds
 * `known` (its state vector) and whose ids are owned as `owners` says. New ids are to be claimed.
 */
export function checkOwnership(
	owners: ReadonlyMap<number, string>,
	known: ReadonlyMap<number, number>,
	userId: string,
	ids: Iterable<number>
): OwnershipVerdict {
	const claim: number[] = [];
	for (const id of ids) {
		const owner = owners.get(id);
		if (owner === undefined) {
			if ((known.get(id) ?? 0) > 0) return { ok: false, clientId: id, reason: REASON_FORGED };
			claim.push(id);
		} else if (owner !== userId) {
			return { ok: false, clientId: id, reason: REASON_FORGED };
		}
	}
	return { ok: true, claim };
}

export async function loadOwners(db: DB, boardId: string): Promise<Map<number, string>> {
	const rows = await db.selectFrom('board_client').select(['client_id', 'user_id']).where('board_id', '=', boardId).execute();
	return new Map(rows.map((r) => [Number(r.client_id), r.user_id]));
}

/**
 * Claims ids for a member. Another process may have claimed one first: the stored owners of all
 * the ids are returned, and the caller checks them again.
 */
export async function claimOwners(db: DB, boardId: string, userId: string, ids: number[]): Promise<Map<number, string>> {
	if (ids.length === 0) return new Map();
	await db
		.insertInto('board_client')
		.values(ids.map((id) => ({ board_id: boardId, client_id: String(id), user_id: userId })))
		.onConflict((oc) => oc.columns(['board_id', 'client_id']).doNothing())
		.execute();
	const rows = await db
		.selectFrom('board_client')
		.select(['client_id', 'user_id'])
		.where('board_id', '=', boardId)
		.where('client_id', '=', sql<string>`any(${sql.val(ids.map(String))}::bigint[])`)
		.execute();
	return new Map(rows.map((r) => [Number(r.client_id), r.user_id]));
}

/**
 * Makes sure `userId` may write under `ids`, using and filling the room's cache of owners. Ids
 * not in the cache are looked up (another process may have seen them); ids nobody owns are
 * claimed, unless the board already holds content under them (written before ownership was
 * recorded): those stay closed.
 */
export async function ensureOwnership(
	db: DB,
	owners: Map<number, string>,
	boardId: string,
	userId: string,
	ids: Iterable<number>,
	stateOf: (clientId: number) => number
): Promise<OwnershipVerdict> {
	const unknown: number[] = [];
	for (const id of ids) {
		const owner = owners.get(id);
		if (owner === undefined) unknown.push(id);
		else if (owner !== userId) return { ok: false, clientId: id, reason: REASON_FORGED };
	}
	if (unknown.length === 0) return { ok: true, claim: [] };
	const stored = await db
		.selectFrom('board_client')
		.select(['client_id', 'user_id'])
		.where('board_id', '=', boardId)
		.where('client_id', '=', sql<string>`any(${sql.val(unknown.map(String))}::bigint[])`)
		.execute();
	for (const r of stored) owners.set(Number(r.client_id), r.user_id);
	const claim: number[] = [];
	for (const id of unknown) {
		const owner = owners.get(id);
		if (owner !== undefined) {
			if (owner !== userId) return { ok: false, clientId: id, reason: REASON_FORGED };
		} else if (stateOf(id) > 0) {
			return { ok: false, clientId: id, reason: REASON_FORGED };
		} else {
			claim.push(id);
		}
	}
	if (claim.length) {
		const now = await claimOwners(db, boardId, userId, claim);
		for (const [id, owner] of now) owners.set(id, owner);
		for (const id of claim) if (owners.get(id) !== userId) return { ok: false, clientId: id, reason: REASON_FORGED };
	}
	return { ok: true, claim };
}
