// Hook "check": everything that can be wrong with an update, found before it is stored: size
// limits, byte budgets, a strict decode (malformed → the socket is closed), the document size,
// the board policy (src/lib/board/model/policy.ts, the same the browser runs) on the room's
// shadow copy, and client-id ownership (client-ids.ts). Read-only members skip the policy:
// the store's own check refuses them with the reason.
import * as Y from 'yjs';
import { Malformed } from '../../../board/sync/frames';
import { checkBoardChange, cloneDoc, resolveLimits, type BoardLimits } from '../../../board/model/policy';
import { refusalMessage } from '../../../board/sync/policy-check';
import type { MessageAck } from '../../../board/sync/protocol';
import type { CollabContext } from '../context';
import { who } from '../context';
import type { BoardRoom, RoomMember } from '../room';
import { kib, spend } from '../budget';
import { holdReading } from '../hold-reading';
import { buildsOnMissing, catchUpShadow, decodeUpdateStrict, isCoveredBy, isEmptyUpdate, type DecodedUpdate } from '../update-check';
import { ensureOwnership, structClientIds } from '../client-ids';
import { overBudget, refused } from './acknowledge';

/** The wait suggested for an update that builds on one answered "not now". */
const HELD_BACK_RETRY_MS = 250;

/**
 * The checks that need nothing but the message and the room, run at once; a Malformed throw
 * closes the socket before its next message is read. What passes goes on to `checkRights`.
 */
export function checkUpdate(
	ctx: CollabContext,
	room: BoardRoom,
	member: RoomMember,
	update: Uint8Array
): { ok: true; decoded: DecodedUpdate } | { ok: false; ack: MessageAck } | { ok: false; covered: true } {
	const { options, log } = ctx;
	const size = update.byteLength;
	if (size > options.maxUpdateBytes) {
		log.warn(`[collab] refused an update from ${who(member.socket)}: ${size} bytes, over the ${options.maxUpdateBytes}-byte limit`);
		return {
			ok: false,
			ack: refused(`This change is too large to save (${kib(size)}; the limit is ${kib(options.maxUpdateBytes)}). It was not saved.`)
		};
	}
	const budget = spend(member.bytes, room.bytes, size);
	if (!budget.ok) {
		// Not read again until the wait is over: a sender that does not wait is held at the network.
		holdReading(member.socket, budget.retryAfterMs);
		member.heldBack = true;
		return { ok: false, ack: overBudget(ctx, room, member, budget.who, budget.retryAfterMs) };
	}
	let decoded: DecodedUpdate;
	try {
		decoded = decodeUpdateStrict(update);
	} catch (e) {
		throw new Malformed(`update does not decode: ${(e as Error).message}`);
	}
	// Nothing new (e.g. a read-only member's sync step 2 after a reconnect, or a change sent again
	// that the room already shows): nothing to store, but the answer "stored" waits for what the
	// room holds to be stored (receive.ts).
	if (isEmptyUpdate(decoded) || isCoveredBy(room.doc, decoded)) return { ok: false, covered: true };
	if (member.heldBack) {
		// Sent before the client heard "not now" for an earlier one it builds on: that one comes
		// again first (the client keeps both, in order), so this one waits too.
		if (buildsOnMissing(room.doc, decoded)) {
			return { ok: false, ack: overBudget(ctx, room, member, 'connection', Math.max(HELD_BACK_RETRY_MS, member.bytes.waitMs())) };
		}
		member.heldBack = false;
	}
	if (member.readOnly) return { ok: true, decoded };
	if (!room.size.fits(room.doc, size, options.maxDocumentBytes)) {
		log.warn(`[collab] refused an update from ${who(member.socket)}: the board would pass ${options.maxDocumentBytes} bytes`);
		return {
			ok: false,
			ack: refused(`This board has reached its size limit (${kib(options.maxDocumentBytes)}). Your change was not saved.`)
		};
	}
	return { ok: true, decoded };
}

/**
 * The member's rights over the change: the board policy, then client-id ownership. The reason in
 * words for the person when it may not be stored; else which shadow copy holds it already (null:
 * none, the member is read-only). Runs in the member's queue (after its earlier updates were
 * checked), since both depend on what came before.
 */
export async function checkRights(
	ctx: CollabContext,
	room: BoardRoom,
	member: RoomMember,
	update: Uint8Array,
	decoded: DecodedUpdate
): Promise<string | { shadowGen: number | null }> {
	if (member.readOnly) return { shadowGen: null }; // the store's own check refuses it with the reason
	const refusal = checkPolicy(ctx, room, member, update);
	if (refusal) {
		ctx.log.warn(`[collab] refused an update from ${who(member.socket)}: ${refusal}`);
		return refusal;
	}
	const shadowGen = room.shadowGen;
	return (await checkClientIds(ctx, room, member, decoded)) ?? { shadowGen };
}

const limitsByOptions = new WeakMap<CollabContext['options'], BoardLimits>();
/** The policy's limits from the collab options, worked out once per set of options. */
function boardLimitsOf(options: CollabContext['options']): BoardLimits {
	let limits = limitsByOptions.get(options);
	if (!limits) {
		limits = resolveLimits({ ...options.boardLimits, maxUpdateBytes: options.maxUpdateBytes, maxDocumentBytes: options.maxDocumentBytes });
		limitsByOptions.set(options, limits);
	}
	return limits;
}

/**
 * The board policy on the room's shadow copy: null when the update may be stored, else the
 * reasons in words for the person.
 */
function checkPolicy(ctx: CollabContext, room: BoardRoom, member: RoomMember, update: Uint8Array): string | null {
	if (!room.shadow) room.shadow = cloneDoc(room.doc);
	else if (room.shadowBehind) catchUpShadow(room.shadow, room.doc);
	room.shadowBehind = false;
	const r = checkBoardChange(
		room.doc,
		update,
		{ role: member.viewer.role, userId: member.viewer.userId, name: member.viewer.name },
		{
			frozen: false, // read-only members and frozen boards are refused by the store's own check
			limits: boardLimitsOf(ctx.options),
			documentBytes: room.size.bound
		},
		{ shadow: room.shadow }
	);
	if (r.ok) return null;
	// The shadow now holds a change the room will never get: start it afresh next time.
	room.dropShadow();
	return refusalMessage(r.refusals.map((x) => x.reason));
}

/** Client ids belong to the member who introduced them: null when the update keeps to its own. */
async function checkClientIds(ctx: CollabContext, room: BoardRoom, member: RoomMember, decoded: DecodedUpdate): Promise<string | null> {
	const verdict = await ensureOwnership(ctx.db, room.owners, room.id, member.viewer.userId, structClientIds(decoded), (id) =>
		Y.getState(room.doc.store, id)
	);
	if (verdict.ok) return null;
	ctx.log.warn(`[collab] refused an update from ${who(member.socket)}: writes under client id ${verdict.clientId} of someone else`);
	room.dropShadow();
	return verdict.reason;
}
