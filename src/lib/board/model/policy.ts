// The board policy: whether one change to a board's Yjs document may be accepted, and if not,
// which items it refuses and why, in words a person can act on. Pure (no I/O): the browser runs
// it before sending a change, so the person learns at once, and the server runs it on every
// update, whatever the client claims.
//
// How a change is inspected: the update is applied to a copy of the document (or to a shadow the
// caller keeps in step with it); the transaction's `changed` set says which items it touched, and
// each touched item is compared field by field with the document before. Yjs creates root types
// lazily from an update, so new names in `doc.share` show roots outside the model.
//
// Rights (the rules for `review.decide` are replicated here so the browser can share them;
// tests/unit/board/policy.test.ts checks they match src/lib/server/auth/guard.ts):
// - a viewer (any role without board.write) changes nothing, and a frozen board takes nothing;
// - only roles that may decide (engineer, admin) write a review decision (flagged, rejected,
//   approved), reopen a decided point, or write who decided;
// - anyone else may not edit, move, replace or delete an approved or rejected point, nor create,
//   edit or delete a cable route that starts at one (the route is part of what was decided), nor
//   change the scale while the board holds an approved point (approved distances and route
//   lengths measured on the photo follow the scale); a flagged point asks for rework: it may be
//   moved and edited, with its route, but not deleted or un-flagged;
// - everything else (placing, editing and deleting undecided points, routes and keep-out zones,
//   whoever placed them) is open to every role that may write, as surveying is shared work.
import * as Y from 'yjs';
import type { z } from 'zod';
import {
	isReviewDecision,
	POINT_STATUS_LABEL,
	pointItemShape,
	REQUIRED_ITEM_KEYS,
	routeItemShape,
	scaleSchema,
	zoneItemShape,
	type PointStatus
} from '../../schemas/board';
import { LOCAL_ORIGIN, MAP_META, MAP_POINTS, MAP_ROUTES, MAP_ZONES, META_SCALE, maps, type ItemKind } from './schema';

/** Roles with `board.write` in src/lib/server/auth/guard.ts. */
export const BOARD_WRITE_ROLES: readonly string[] = ['admin', 'engineer', 'technician'];
/** Roles with `review.decide` in src/lib/server/auth/guard.ts. */
export const REVIEW_DECIDE_ROLES: readonly string[] = ['admin', 'engineer'];

export interface BoardLimits {
	maxPoints: number;
	maxRoutes: number;
	maxZones: number;
	/** Largest single update, bytes. */
	maxUpdateBytes: number;
	/** Largest whole document (as Y.encodeStateAsUpdate gives it), bytes. */
	maxDocumentBytes: number;
}

export const DEFAULT_BOARD_LIMITS: Readonly<BoardLimits> = Object.freeze({
	maxPoints: 2000,
	maxRoutes: 1000,
	maxZones: 500,
	// The same as the live board's defaults (COLLAB_MAX_UPDATE_BYTES, COLLAB_MAX_DOCUMENT_BYTES).
	maxUpdateBytes: 512 * 1024,
	maxDocumentBytes: 8 * 1024 * 1024
});

export interface BoardActor {
	/** Member role: 'admin' | 'engineer' | 'technician' | 'viewer'; anything else may not write. */
	role: string;
	userId: string;
	name: string;
}

export interface BoardPolicyContext {
	frozen: boolean;
	/** Defaults to DEFAULT_BOARD_LIMITS for any limit not given. */
	limits?: Partial<BoardLimits>;
	/** For the words of a refusal ("at 10:42" today, else with the date); Date.now() by default. */
	now?: number;
	/** IANA time zone for times in refusals; the runtime's own zone by default. */
	timeZone?: string;
	/**
	 * Size of the document before the change, bytes, when the caller knows it (the server does:
	 * snapshot plus log). Without it the policy encodes the document when the size may matter.
	 */
	documentBytes?: number;
}

export type RefusalKind = ItemKind | 'scale' | 'document';

export type RefusalCode =
	| 'rights.read-only'
	| 'rights.frozen'
	| 'rights.decide'
	| 'rights.decided-point'
	| 'rights.decided-route'
	| 'rights.scale'
	| 'schema.value'
	| 'schema.unknown-key'
	| 'schema.missing-key'
	| 'schema.removed-key'
	| 'schema.item'
	| 'schema.route-point'
	| 'document.unknown-root'
	| 'document.shape'
	| 'document.malformed'
	| 'document.incomplete'
	| 'limit.points'
	| 'limit.routes'
	| 'limit.zones'
	| 'limit.update-bytes'
	| 'limit.document-bytes';

export interface BoardRefusal {
	kind: RefusalKind;
	/** The item's id (points, routes, zones) or the root's name ('document'). */
	id?: string;
	field?: string;
	/** Plain words for the person whose change it was: what happened and what to do. */
	reason: string;
	code: RefusalCode;
	/** The decision that protects the item, for a UI that formats it itself. */
	decision?: { status: PointStatus; byName: string | null; at: number | null };
}

export type BoardPolicyResult = { ok: true } | { ok: false; refusals: BoardRefusal[] };

export interface CheckOptions {
	/**
	 * A copy of `before` to apply the update to, kept in step by the caller, so the document need
	 * not be copied for every update. After `{ ok: true }` it holds before + update (apply the same
	 * update to `before` and they are in step again); after a refusal it holds the refused change
	 * and must be rebuilt (`cloneDoc(before)`).
	 */
	shadow?: Y.Doc;
}

/** At most this many refusals are listed; one change rarely needs more to be understood. */
const MAX_REFUSALS = 20;
const MODEL_ROOTS: ReadonlySet<string> = new Set([MAP_POINTS, MAP_ROUTES, MAP_ZONES, MAP_META]);
const ROOT_KIND: Readonly<Record<string, ItemKind>> = { [MAP_POINTS]: 'point', [MAP_ROUTES]: 'route', [MAP_ZONES]: 'zone' };
const META_KEYS: ReadonlySet<string> = new Set([META_SCALE]);
/** Ids the model makes (newId: 24 hex digits), with room for other short, plain ids. */
const ITEM_ID = /^[A-Za-z0-9_-]{1,64}$/;
const DECISION_KEYS: ReadonlySet<string> = new Set(['decidedBy', 'decidedByName', 'decidedAt', 'decisionReason', 'decisionNote']);

type FieldSchema = z.ZodType;
const SHAPES: Readonly<Record<ItemKind, Readonly<Record<string, FieldSchema>>>> = {
	point: pointItemShape,
	route: routeItemShape,
	zone: zoneItemShape
};

export function canWriteBoard(role: string): boolean {
	return BOARD_WRITE_ROLES.includes(role);
}

export function canDecideReview(role: string): boolean {
	return REVIEW_DECIDE_ROLES.includes(role);
}

export function resolveLimits(limits?: Partial<BoardLimits>): BoardLimits {
	const out = { ...DEFAULT_BOARD_LIMITS };
	for (const k of Object.keys(out) as Array<keyof BoardLimits>) {
		const v = limits?.[k];
		if (typeof v === 'number' && Number.isFinite(v) && v >= 0) out[k] = v;
	}
	return out;
}

/** A separate document with the same content (its own client id). */
export function cloneDoc(doc: Y.Doc): Y.Doc {
	const copy = new Y.Doc({ gc: doc.gc });
	Y.applyUpdate(copy, Y.encodeStateAsUpdate(doc));
	return copy;
}

/**
 * Checks one update against the board policy. `before` is left untouched. Never throws: a
 * malformed update is refused like any other.
 */
export function checkBoardChange(
	before: Y.Doc,
	update: Uint8Array,
	actor: BoardActor,
	ctx: BoardPolicyContext,
	opts: CheckOptions = {}
): BoardPolicyResult {
	const limits = resolveLimits(ctx.limits);
	if (!(update instanceof Uint8Array)) return refuse(docRefusal('document.malformed', 'The change could not be read. Reload the board.'));
	if (update.byteLength > limits.maxUpdateBytes) {
		return refuse(
			docRefusal(
				'limit.update-bytes',
				`This change is ${bytes(update.byteLength)}; one change may be at most ${bytes(limits.maxUpdateBytes)}. Make it in smaller steps.`
			)
		);
	}
	let decoded: ReturnType<typeof Y.decodeUpdate>;
	try {
		decoded = Y.decodeUpdate(update);
	} catch {
		return refuse(docRefusal('document.malformed', 'The change could not be read. Reload the board.'));
	}
	// Nothing new (a reconnecting client resends what the server has): nothing to check.
	if (isCoveredBy(before, decoded)) return { ok: true };
	const gate = gateRefusal(actor, ctx);
	if (gate) return refuse(gate);

	let beforeBytes = ctx.documentBytes;
	let after: Y.Doc;
	try {
		if (opts.shadow) after = opts.shadow;
		else {
			const state = Y.encodeStateAsUpdate(before);
			beforeBytes ??= state.byteLength;
			after = new Y.Doc({ gc: before.gc });
			Y.applyUpdate(after, state);
		}
	} catch {
		return refuse(docRefusal('document.malformed', 'The board could not be copied to check the change. Reload the board.'));
	}
	const hadPending = before.store.pendingStructs !== null || before.store.pendingDs !== null;
	const changes = new ChangeCollector(after);
	try {
		Y.applyUpdate(after, update);
	} catch {
		return refuse(docRefusal('document.malformed', 'The change could not be read. Reload the board.'));
	} finally {
		changes.stop();
	}
	if (!hadPending && (after.store.pendingStructs !== null || after.store.pendingDs !== null)) {
		return refuse(
			docRefusal('document.incomplete', 'The change builds on earlier changes the board does not have. Reload the board and make it again.')
		);
	}
	return safeJudge(before, after, changes, actor, ctx, limits, update.byteLength, beforeBytes);
}

/** A change the policy cannot judge is refused, never let through or thrown. */
function safeJudge(...args: Parameters<typeof judge>): BoardPolicyResult {
	try {
		return judge(...args);
	} catch {
		return refuse(docRefusal('document.malformed', 'The change could not be checked. Reload the board.'));
	}
}

export type LocalChangeResult<T> = { ok: true; value: T; update: Uint8Array | null } | { ok: false; refusals: BoardRefusal[]; value: T };

const localShadows = new WeakMap<Y.Doc, Y.Doc>();
/** Upper bound of the document's size: measured when the shadow was made, plus every update since. */
const localBytes = new WeakMap<Y.Doc, number>();

function localShadow(doc: Y.Doc): Y.Doc {
	let shadow = localShadows.get(doc);
	if (shadow) return shadow;
	const state = Y.encodeStateAsUpdate(doc);
	const fresh = new Y.Doc({ gc: doc.gc });
	Y.applyUpdate(fresh, state);
	localBytes.set(doc, state.byteLength);
	// Kept in step with every change to the document, from here, from peers or from storage.
	const follow = (u: Uint8Array) => {
		if (localShadows.get(doc) !== fresh) return;
		Y.applyUpdate(fresh, u);
		localBytes.set(doc, (localBytes.get(doc) ?? 0) + u.byteLength);
	};
	doc.on('update', follow);
	localShadows.set(doc, fresh);
	fresh.on('destroy', () => doc.off('update', follow));
	shadow = fresh;
	return shadow;
}

function dropShadow(doc: Y.Doc) {
	const shadow = localShadows.get(doc);
	localShadows.delete(doc);
	shadow?.destroy();
}

/**
 * Runs a local change (the model's operations) through the policy before it reaches the document:
 * the change is made on a shadow copy that keeps the document's client id, checked, and only when
 * accepted applied to `doc` as one local transaction with `origin` (so the undo manager and the
 * sync provider see it as the person's own edit). A refused change never touches `doc`.
 *
 *   const r = applyLocalChecked(doc, actor, ctx, (d) => updatePoint(d, id, { notes }));
 *   if (!r.ok) show(r.refusals[0].reason);
 *
 * Errors thrown by `change` (e.g. a ZodError for a bad value) are passed on, with `doc` untouched.
 */
export function applyLocalChecked<T>(
	doc: Y.Doc,
	actor: BoardActor,
	ctx: BoardPolicyContext,
	change: (draft: Y.Doc) => T,
	origin: unknown = LOCAL_ORIGIN
): LocalChangeResult<T> {
	const shadow = localShadow(doc);
	const ownId = shadow.clientID;
	const updates: Uint8Array[] = [];
	const collect = (u: Uint8Array) => updates.push(u);
	const changes = new ChangeCollector(shadow);
	shadow.on('update', collect);
	// The draft writes under the document's own client id, as if made in the document itself.
	shadow.clientID = doc.clientID;
	let value: T;
	try {
		value = change(shadow);
	} catch (e) {
		dropShadow(doc);
		throw e;
	} finally {
		shadow.clientID = ownId;
		shadow.off('update', collect);
		changes.stop();
	}
	if (updates.length === 0) return { ok: true, value, update: null };
	const update = updates.length === 1 ? updates[0] : Y.mergeUpdates(updates);
	const limits = resolveLimits(ctx.limits);
	const refusals: BoardRefusal[] = [];
	const gate = gateRefusal(actor, ctx);
	if (gate) refusals.push(gate);
	else if (update.byteLength > limits.maxUpdateBytes) {
		refusals.push(
			docRefusal(
				'limit.update-bytes',
				`This change is ${bytes(update.byteLength)}; one change may be at most ${bytes(limits.maxUpdateBytes)}. Make it in smaller steps.`
			)
		);
	} else {
		const r = safeJudge(doc, shadow, changes, actor, ctx, limits, update.byteLength, ctx.documentBytes ?? localBytes.get(doc));
		if (!r.ok) refusals.push(...r.refusals);
	}
	if (refusals.length > 0) {
		dropShadow(doc);
		return { ok: false, refusals, value };
	}
	// Yjs marks a transaction that applies an update as remote, and a remote change under the
	// document's own client id makes it pick a new one (it assumes a clash). This one is local.
	doc.transact((tr) => {
		Y.applyUpdate(doc, update);
		tr.local = true;
	}, origin);
	return { ok: true, value, update };
}

// ---------------------------------------------------------------------------------------------

function refuse(...refusals: BoardRefusal[]): BoardPolicyResult {
	return { ok: false, refusals };
}

function docRefusal(code: RefusalCode, reason: string, id?: string): BoardRefusal {
	return id === undefined ? { kind: 'document', code, reason } : { kind: 'document', code, reason, id };
}

function gateRefusal(actor: BoardActor, ctx: BoardPolicyContext): BoardRefusal | null {
	const role = typeof actor?.role === 'string' ? actor.role : '';
	if (!canWriteBoard(role)) {
		return docRefusal(
			'rights.read-only',
			role === 'viewer' ? 'Viewers can look at the board but not change it.' : 'Your role cannot change this board.'
		);
	}
	if (ctx.frozen) return docRefusal('rights.frozen', 'The board is frozen, so it takes no changes; ask an engineer to unfreeze it.');
	return null;
}

function bytes(n: number): string {
	if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB`;
	if (n >= 1024) return `${Math.round(n / 1024)} KB`;
	return `${n} bytes`;
}

/** True when the update holds nothing `doc` lacks: every struct known, every deletion done. */
export function isCoveredBy(doc: Y.Doc, d: ReturnType<typeof Y.decodeUpdate>): boolean {
	const store = doc.store;
	for (const s of d.structs) {
		if (s instanceof Y.Skip) continue;
		if (s.id.clock + s.length > Y.getState(store, s.id.client)) return false;
	}
	for (const [client, ranges] of d.ds.clients) {
		const structs = store.clients.get(client);
		const known = Y.getState(store, client);
		for (const r of ranges) {
			if (r.len === 0) continue;
			if (!structs || r.clock + r.len > known) return false;
			let i = Y.findIndexSS(structs, r.clock);
			const end = r.clock + r.len;
			while (i < structs.length && structs[i].id.clock < end) {
				if (!structs[i].deleted) return false;
				i++;
			}
		}
	}
	return true;
}

/** Which items, meta keys and roots the transactions on `doc` touched while it listened. */
class ChangeCollector {
	readonly items: Record<ItemKind, Set<string>> = { point: new Set(), route: new Set(), zone: new Set() };
	readonly meta = new Set<string>();
	/** Roots outside the model that received content, and changes the model cannot place. */
	readonly strays = new Set<string>();
	readonly misplaced: string[] = [];
	#doc: Y.Doc;
	#rootNames = new Map<unknown, string>();

	constructor(doc: Y.Doc) {
		this.#doc = doc;
		maps(doc); // the model's roots exist as maps before anything arrives
		doc.on('afterTransaction', this.#onTransaction);
	}

	stop() {
		this.#doc.off('afterTransaction', this.#onTransaction);
	}

	#rootName(type: unknown): string | null {
		let name = this.#rootNames.get(type);
		if (name === undefined) {
			this.#rootNames.clear();
			for (const [n, t] of this.#doc.share) this.#rootNames.set(t, n);
			name = this.#rootNames.get(type);
		}
		return name ?? null;
	}

	#onTransaction = (tr: Y.Transaction) => {
		for (const [type, keys] of tr.changed) {
			// Climb to the child of a root: that is the item (or meta entry) the change is in.
			let t = type as Y.AbstractType<unknown>;
			let key: string | null = null;
			let nested = false;
			let guard = 0;
			while (t._item !== null && guard++ < 10_000) {
				const parent = t._item.parent;
				if (!(parent instanceof Y.AbstractType)) break;
				key = t._item.parentSub;
				nested = true;
				t = parent as Y.AbstractType<unknown>;
			}
			const root = t._item === null ? this.#rootName(t) : null;
			if (root === null) {
				this.misplaced.push('a part of the board that cannot be placed');
				continue;
			}
			if (!MODEL_ROOTS.has(root)) {
				this.strays.add(root);
				continue;
			}
			const targets = nested ? [key] : [...keys];
			for (const k of targets) {
				if (k === null) {
					this.misplaced.push(root);
					continue;
				}
				if (root === MAP_META) this.meta.add(k);
				else this.items[ROOT_KIND[root]].add(k);
			}
		}
	};
}

/** A value as plain data: no Yjs types, no binary, no objects with an unusual prototype. */
function isPlainData(v: unknown, depth = 0): boolean {
	if (depth > 8) return false;
	if (v === null || typeof v === 'string' || typeof v === 'boolean') return true;
	if (typeof v === 'number') return true; // ranges and finiteness are the field schema's job
	if (Array.isArray(v)) {
		if (Object.getPrototypeOf(v) !== Array.prototype) return false;
		return v.every((x) => isPlainData(x, depth + 1));
	}
	if (typeof v === 'object') {
		const proto = Object.getPrototypeOf(v);
		if (proto !== Object.prototype && proto !== null) return false;
		return Object.values(v as object).every((x) => isPlainData(x, depth + 1));
	}
	return false;
}

function sameValue(a: unknown, b: unknown, depth = 0): boolean {
	if (Object.is(a, b)) return true;
	if (depth > 8 || a === null || b === null || typeof a !== 'object' || typeof b !== 'object') return false;
	if (a instanceof Y.AbstractType || b instanceof Y.AbstractType) return false;
	if (Array.isArray(a) !== Array.isArray(b)) return false;
	if (Array.isArray(a)) {
		const bb = b as unknown[];
		return a.length === bb.length && a.every((x, i) => sameValue(x, bb[i], depth + 1));
	}
	if (!isPlainData(a, depth) || !isPlainData(b, depth)) return false;
	const ka = Object.keys(a as object);
	const kb = Object.keys(b as object);
	return (
		ka.length === kb.length && ka.every((k) => sameValue((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], depth + 1))
	);
}

function mapOf(root: Y.Map<unknown> | Y.Map<Y.Map<unknown>>, id: string): Y.Map<unknown> | null {
	const v = root.get(id);
	return v instanceof Y.Map ? v : null;
}

function itemIdentity(m: Y.Map<unknown>): string {
	const id = m._item?.id;
	return id ? `${id.client}:${id.clock}` : '';
}

/** The status the board reads for a point ('proposed' when absent or not valid). */
function statusOf(m: Y.Map<unknown> | null): PointStatus {
	const s = m?.get('status');
	return s === 'approved' || s === 'flagged' || s === 'rejected' || s === 'proposed' ? s : 'proposed';
}

function labelOf(...ms: Array<Y.Map<unknown> | null>): string {
	for (const m of ms) {
		const l = m?.get('label');
		if (typeof l === 'string' && l.trim() !== '' && l.length <= 40) return l.trim();
	}
	return 'A point';
}

const DECISION_WORD: Record<PointStatus, string> = {
	proposed: 'proposed',
	approved: 'approved',
	flagged: 'flagged for a look',
	rejected: 'rejected'
};

function formatWhen(at: number, ctx: BoardPolicyContext): string {
	const now = ctx.now ?? Date.now();
	try {
		const tz = ctx.timeZone;
		const day = new Intl.DateTimeFormat('en-GB', { timeZone: tz, year: 'numeric', month: 'short', day: 'numeric' });
		const time = new Intl.DateTimeFormat('en-GB', { timeZone: tz, hour: '2-digit', minute: '2-digit', hour12: false }).format(at);
		return day.format(at) === day.format(now) ? `at ${time}` : `on ${day.format(at)} at ${time}`;
	} catch {
		return `at ${new Date(at).toISOString().slice(0, 16).replace('T', ' ')} UTC`;
	}
}

function decisionOf(m: Y.Map<unknown> | null): BoardRefusal['decision'] {
	const status = statusOf(m);
	const by = m?.get('decidedByName');
	const at = m?.get('decidedAt');
	return {
		status,
		byName: typeof by === 'string' && by.trim() !== '' ? by.trim().slice(0, 80) : null,
		at: typeof at === 'number' && Number.isFinite(at) && at >= 0 ? at : null
	};
}

/** "approved by Esme at 10:42" / "approved by an engineer". */
function decisionWords(d: NonNullable<BoardRefusal['decision']>, ctx: BoardPolicyContext): string {
	const who = d.byName ? `by ${d.byName}` : 'by an engineer';
	const when = d.at !== null ? ` ${formatWhen(d.at, ctx)}` : '';
	return `${DECISION_WORD[d.status]} ${who}${when}`;
}

function askWho(d: NonNullable<BoardRefusal['decision']>): string {
	return d.byName ? `ask ${d.byName} to reopen it` : 'ask an engineer to reopen it';
}

const KIND_NOUN: Record<ItemKind, string> = { point: 'point', route: 'cable route', zone: 'keep-out zone' };
const LIMIT_KEY: Record<ItemKind, { key: 'maxPoints' | 'maxRoutes' | 'maxZones'; code: RefusalCode; plural: string }> = {
	point: { key: 'maxPoints', code: 'limit.points', plural: 'points' },
	route: { key: 'maxRoutes', code: 'limit.routes', plural: 'cable routes' },
	zone: { key: 'maxZones', code: 'limit.zones', plural: 'keep-out zones' }
};
const ROOT_OF: Record<ItemKind, 'points' | 'routes' | 'zones'> = { point: 'points', route: 'routes', zone: 'zones' };

function fieldMessage(schema: FieldSchema, value: unknown): string | null {
	if (!isPlainData(value)) return 'not a plain value';
	const r = schema.safeParse(value);
	return r.success ? null : (r.error.issues[0]?.message ?? 'not a valid value');
}

/** The policy proper, on a document before and after the change and what the change touched. */
function judge(
	before: Y.Doc,
	after: Y.Doc,
	changes: ChangeCollector,
	actor: BoardActor,
	ctx: BoardPolicyContext,
	limits: BoardLimits,
	updateBytes: number,
	beforeBytes: number | undefined
): BoardPolicyResult {
	const out: BoardRefusal[] = [];
	const full = () => out.length >= MAX_REFUSALS;

	// Roots outside the model.
	const knownBefore = new Set(before.share.keys());
	for (const name of after.share.keys()) {
		if (MODEL_ROOTS.has(name) || knownBefore.has(name)) continue;
		changes.strays.add(name);
	}
	for (const name of changes.strays) {
		if (full()) break;
		out.push(
			docRefusal('document.unknown-root', `The change writes "${name.slice(0, 40)}", which is not part of a board.`, name.slice(0, 200))
		);
	}
	for (const where of changes.misplaced) {
		if (full()) break;
		out.push(docRefusal('document.shape', `The change writes into ${where} in a way the board does not use.`));
	}

	// Limits: counts only refuse growth, so a board over a limit can still be tidied up.
	const b = maps(before);
	const a = maps(after);
	for (const kind of ['point', 'route', 'zone'] as const) {
		const { key, code, plural } = LIMIT_KEY[kind];
		// Counting a map walks all its entries: only when the change added an item of this kind.
		const beforeMap = b[ROOT_OF[kind]];
		let added = false;
		for (const id of changes.items[kind]) {
			if (!beforeMap.has(id)) {
				added = true;
				break;
			}
		}
		if (!added) continue;
		const n = a[ROOT_OF[kind]].size;
		if (n > limits[key] && n > b[ROOT_OF[kind]].size) {
			out.push({
				kind: 'document',
				code,
				reason: `A board holds at most ${limits[key].toLocaleString('en-GB')} ${plural}; this change would make ${n.toLocaleString('en-GB')}.`
			});
		}
	}
	let docBytes = beforeBytes !== undefined ? beforeBytes + updateBytes : Number.POSITIVE_INFINITY;
	if (docBytes > limits.maxDocumentBytes) {
		// The estimate says it may be too big: measure exactly (a resent part adds nothing).
		docBytes = Y.encodeStateAsUpdate(after).byteLength;
		const was = beforeBytes ?? Y.encodeStateAsUpdate(before).byteLength;
		if (docBytes > limits.maxDocumentBytes && docBytes > was) {
			out.push(
				docRefusal(
					'limit.document-bytes',
					`The board would grow to ${bytes(docBytes)}; a board may hold at most ${bytes(limits.maxDocumentBytes)}. Split the work over more boards.`
				)
			);
		}
	}
	if (out.some((r) => r.code.startsWith('limit.'))) return refuse(...out);

	const decider = canDecideReview(actor.role);
	const ctxWords = (m: Y.Map<unknown> | null) => {
		const d = decisionOf(m)!;
		return { d, words: decisionWords(d, ctx), ask: askWho(d) };
	};

	// Points first: routes look at the decisions on their points.
	for (const kind of ['point', 'route', 'zone'] as const) {
		const shape = SHAPES[kind];
		const rootB = b[ROOT_OF[kind]] as Y.Map<unknown>;
		const rootA = a[ROOT_OF[kind]] as Y.Map<unknown>;
		for (const id of changes.items[kind]) {
			if (full()) break;
			const rawAfter = rootA.get(id);
			const mb = mapOf(rootB, id);
			const ma = rawAfter instanceof Y.Map ? rawAfter : null;
			const noun = KIND_NOUN[kind];
			const label = kind === 'point' ? labelOf(mb, ma) : null;
			const name = label ?? `A ${noun}`;

			const created = ma !== null && mb === null;
			const deleted = ma === null && rootB.has(id);
			const replaced = ma !== null && mb !== null && itemIdentity(ma) !== itemIdentity(mb);
			if ((created || (rawAfter !== undefined && !ma)) && !ITEM_ID.test(id)) {
				out.push({
					kind,
					id: id.slice(0, 64),
					code: 'schema.item',
					reason: `A ${noun} cannot have the id "${id.length > 24 ? `${id.slice(0, 24)}…` : id}".`
				});
				continue;
			}
			if (rawAfter !== undefined && !ma) {
				out.push({ kind, id, code: 'schema.item', reason: `${name} is not stored in the form the board uses.` });
				continue;
			}

			// Which fields changed.
			const changed: string[] = [];
			if (ma) {
				const keys = new Set<string>([...ma.keys(), ...(mb ? mb.keys() : [])]);
				for (const k of keys) if (!mb || !sameValue(mb.get(k), ma.get(k))) changed.push(k);
			}
			if (!created && !deleted && !replaced && changed.length === 0) continue;

			// Schema of what changed.
			let schemaOk = true;
			if (ma) {
				for (const k of changed) {
					const schema = shape[k];
					if (!ma.has(k)) {
						if (schema) {
							out.push({ kind, id, field: k, code: 'schema.removed-key', reason: `${name}: "${k}" cannot be removed, only changed.` });
							schemaOk = false;
						}
						continue;
					}
					if (!schema) {
						out.push({
							kind,
							id,
							field: k.slice(0, 100),
							code: 'schema.unknown-key',
							reason: `${name} has a field "${k.slice(0, 40)}" the board does not know.`
						});
						schemaOk = false;
						continue;
					}
					const msg = fieldMessage(schema, ma.get(k));
					if (msg) {
						out.push({ kind, id, field: k, code: 'schema.value', reason: `${name}: ${msg}` });
						schemaOk = false;
					}
				}
				if (created || replaced) {
					for (const k of REQUIRED_ITEM_KEYS[kind]) {
						if (!ma.has(k)) {
							out.push({ kind, id, field: k, code: 'schema.missing-key', reason: `${name} has no "${k}", so the board cannot show it.` });
							schemaOk = false;
						}
					}
				}
				if (kind === 'route' && schemaOk && (created || changed.includes('pointId'))) {
					const pid = ma.get('pointId');
					if (typeof pid !== 'string' || !(a.points.get(pid) instanceof Y.Map)) {
						out.push({
							kind,
							id,
							field: 'pointId',
							code: 'schema.route-point',
							reason: 'The cable route starts at a point that is no longer on the board.'
						});
					}
				}
			}
			if (decider) continue;

			// Rights of everyone who may not decide.
			if (kind === 'point') {
				// A flag asks for the point to be looked at again: it may be moved and its fields
				// reworked, but it stays flagged (and on the board) until an engineer decides.
				const rework = statusOf(mb) === 'flagged' && !deleted && !changed.includes('status') && !changed.some((k) => DECISION_KEYS.has(k));
				if (rework) continue;
				if (isReviewDecision(statusOf(mb))) {
					const { d, words, ask } = ctxWords(mb);
					const what = deleted
						? 'cannot be deleted'
						: changed.includes('status')
							? 'can only be reopened by an engineer'
							: 'cannot be changed';
					out.push({
						kind,
						id,
						field: deleted ? undefined : changed.includes('status') ? 'status' : changed[0],
						code: 'rights.decided-point',
						reason: `${name} was ${words} and ${what}; ${ask}.`,
						decision: d
					});
					continue;
				}
				if (ma && isReviewDecision(statusOf(ma)) && (created || changed.includes('status'))) {
					out.push({
						kind,
						id,
						field: 'status',
						code: 'rights.decide',
						reason: `Only an engineer can mark ${name} as ${POINT_STATUS_LABEL[statusOf(ma)].toLowerCase()}.`
					});
					continue;
				}
				const stamp = changed.find((k) => DECISION_KEYS.has(k));
				if (stamp) {
					out.push({ kind, id, field: stamp, code: 'rights.decide', reason: `Only an engineer records who decided on ${name}.` });
				}
			} else if (kind === 'route') {
				const pids = new Set<unknown>([mb?.get('pointId'), ma?.get('pointId')]);
				for (const pid of pids) {
					if (typeof pid !== 'string') continue;
					const point = mapOf(b.points, pid);
					if (!point || !isReviewDecision(statusOf(point)) || statusOf(point) === 'flagged') continue;
					const { d, words, ask } = ctxWords(point);
					const pl = labelOf(point);
					const what = created ? 'takes no new cable route' : deleted ? 'keeps its cable route' : 'keeps its cable route as it is';
					out.push({
						kind,
						id,
						code: 'rights.decided-route',
						reason: `${pl} was ${words} and ${what}; ${ask}.`,
						decision: d
					});
					break;
				}
			}
		}
	}

	// The scale.
	for (const key of changes.meta) {
		if (full()) break;
		if (!META_KEYS.has(key)) {
			if (a.meta.has(key)) {
				out.push({
					kind: 'document',
					field: key.slice(0, 100),
					code: 'schema.unknown-key',
					reason: `The board has no setting "${key.slice(0, 40)}".`
				});
			}
			continue;
		}
		const vb = b.meta.get(key);
		const va = a.meta.get(key);
		if (sameValue(vb, va) && b.meta.has(key) === a.meta.has(key)) continue;
		if (a.meta.has(key)) {
			const msg = !isPlainData(va)
				? 'not a plain value'
				: typeof va !== 'object' || va === null || Array.isArray(va) || Object.keys(va).some((k) => !['a', 'b', 'lengthMm'].includes(k))
					? 'the scale holds a reference line (a, b) and its real length (lengthMm) only'
					: fieldMessage(scaleSchema, va);
			if (msg) out.push({ kind: 'scale', field: key, code: 'schema.value', reason: `Scale: ${msg}` });
		}
		if (!decider) {
			let approved: Y.Map<unknown> | null = null;
			b.points.forEach((m) => {
				if (!approved && m instanceof Y.Map && statusOf(m) === 'approved') approved = m;
			});
			if (approved) {
				out.push({
					kind: 'scale',
					field: key,
					code: 'rights.scale',
					reason: `${labelOf(approved)} and any other approved points take their measured lengths from the scale; only an engineer can change it.`
				});
			}
		}
	}
	return out.length === 0 ? { ok: true } : refuse(...out.slice(0, MAX_REFUSALS));
}
