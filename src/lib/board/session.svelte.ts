// Bridges one board's Y.Doc, its undo manager and its sync provider to Svelte: a validated
// snapshot after every change (only the items a change touched are read again), the connection state, and who else is here.
import * as Y from 'yjs';
import { Awareness } from 'y-protocols/awareness';
import type { Vec2 } from '../trade';
import { addPoint, addZone, createUndoManager, LOCAL_ORIGIN, maps, setEditor, setScale, type BoardSnapshot } from './model';
import { LiveSnapshot } from './snapshot';
import { pointPatchSchema, zonePatchSchema, type ScaleData } from '../schemas/board';
import type { SetAsideEntry } from './sync/set-aside';
import type { OverwriteNotice } from './sync/overwrites';
import { addSetAside, readSetAside, writeSetAside } from './sync/set-aside-store';

/* eslint-disable @typescript-eslint/no-explicit-any */

export type ConnectionStatus = 'local' | 'connecting' | 'connected' | 'disconnected' | 'refused';

/** What the board needs from the sync provider (src/lib/board/sync/provider.ts). */
export interface BoardSyncProvider {
	readonly boardId?: string;
	readonly awareness: Awareness;
	readonly status: 'connecting' | 'connected' | 'disconnected' | 'refused';
	readonly synced: boolean;
	readonly unsynced: number;
	readonly readOnly: boolean;
	readonly readOnlyReason?: string | null;
	/** Why the server is not storing changes just now (they are kept and sent again). */
	readonly delayed?: string | null;
	on(
		event: 'status' | 'synced' | 'unsynced' | 'refused' | 'readonly' | 'doc' | 'delayed' | 'set-aside' | 'overwritten',
		cb: (...args: any[]) => void
	): () => void;
	/** Deletes offline copies kept from earlier refusals (once the tray is empty). */
	forgetEarlierCopies?(): Promise<void>;
	connect(): void;
	disconnect(): void;
	destroy(): Promise<void>;
}

export interface SyncState {
	status: ConnectionStatus;
	synced: boolean;
	unsynced: number;
	readOnly: boolean;
	/** Why the server refused, when it said. */
	reason: string | null;
	/** Why changes are held back for now (kept on the device, sent again), when they are. */
	delayed: string | null;
}

export interface BoardUser {
	name: string;
	color: string;
	role: string;
}

export interface Peer {
	clientId: number;
	name: string;
	color: string;
	role: string;
	cursor: Vec2 | null;
	selection: string[];
}

const CURSOR_INTERVAL_MS = 40;

function readPeer(clientId: number, state: Record<string, unknown>): Peer | null {
	const user = state.user as Partial<BoardUser> | undefined;
	if (!user || typeof user.name !== 'string') return null;
	const c = state.cursor as { x?: unknown; y?: unknown } | null | undefined;
	const cursor: Vec2 | null =
		c && typeof c.x === 'number' && typeof c.y === 'number' && Number.isFinite(c.x) && Number.isFinite(c.y) ? [c.x, c.y] : null;
	const selection = Array.isArray(state.selection) ? (state.selection as unknown[]).filter((s): s is string => typeof s === 'string') : [];
	return {
		clientId,
		name: user.name.slice(0, 80),
		color: typeof user.color === 'string' && /^#[0-9a-f]{6}$/i.test(user.color) ? user.color : '#475569',
		role: typeof user.role === 'string' ? user.role : '',
		cursor,
		selection
	};
}

/** A stable, readable colour per person (mid-dark hues that show on photos with a white halo). */
export function colourFor(key: string): string {
	const palette = ['#1d4ed8', '#7c3aed', '#be185d', '#0f766e', '#b45309', '#4d7c0f', '#0369a1', '#9d174d'];
	let h = 0;
	for (let i = 0; i < key.length; i++) h = (h * 31 + key.charCodeAt(i)) >>> 0;
	return palette[h % palette.length];
}

export interface Refusal {
	reason: string;
	kind: 'update' | 'join' | 'session';
	at: number;
	/** Refused on this device by the board policy, before it was sent. */
	local?: boolean;
}

/** Fields of a point that a new proposal takes over from work that was not accepted. */
const PROPOSAL_FIELDS = Object.keys(pointPatchSchema.shape).filter((k) => k !== 'status' && k !== 'label' && k !== 'distanceLine');

export class LiveBoard {
	readonly awareness: Awareness;
	#provider: BoardSyncProvider | null;
	#doc = $state.raw<Y.Doc>(null as unknown as Y.Doc);
	#undo: Y.UndoManager | null = null;
	#snapshot = $state.raw<BoardSnapshot>({ points: [], routes: [], zones: [], scale: null });
	#canUndo = $state(false);
	#canRedo = $state(false);
	#sync = $state<SyncState>({ status: 'local', synced: false, unsynced: 0, readOnly: false, reason: null, delayed: null });
	#refusal = $state.raw<Refusal | null>(null);
	#peers = $state.raw<Peer[]>([]);
	#setAside = $state.raw<SetAsideEntry[]>([]);
	#overwrites = $state.raw<OverwriteNotice[]>([]);
	#boardId: string | null;
	#user: BoardUser;
	#cleanup: Array<() => void> = [];
	#unbindDoc: (() => void) | null = null;
	#cursorTimer: ReturnType<typeof setTimeout> | null = null;
	#pendingCursor: Vec2 | null | undefined = undefined;

	constructor(doc: Y.Doc, provider: BoardSyncProvider | null, user: BoardUser) {
		this.#provider = provider;
		this.#user = user;
		this.#boardId = provider?.boardId ?? null;
		if (this.#boardId) this.#setAside = readSetAside(this.#boardId);
		this.awareness = provider?.awareness ?? new Awareness(doc);
		this.awareness.setLocalState({ user, cursor: null, selection: [] });
		this.#bind(doc);

		const peers = () => {
			const out: Peer[] = [];
			this.awareness.getStates().forEach((state, clientId) => {
				if (clientId === this.awareness.clientID) return;
				const p = readPeer(clientId, state as Record<string, unknown>);
				if (p) out.push(p);
			});
			this.#peers = out.sort((a, b) => a.name.localeCompare(b.name) || a.clientId - b.clientId);
		};
		this.awareness.on('change', peers);
		this.#cleanup.push(() => this.awareness.off('change', peers));

		if (provider) {
			const read = () => {
				this.#sync = {
					status: provider.status,
					synced: provider.synced,
					unsynced: provider.unsynced,
					readOnly: provider.readOnly,
					reason: provider.readOnlyReason ?? this.#refusal?.reason ?? null,
					delayed: provider.delayed ?? null
				};
			};
			for (const ev of ['status', 'synced', 'unsynced', 'readonly', 'delayed'] as const) this.#cleanup.push(provider.on(ev, () => read()));
			this.#cleanup.push(
				provider.on('refused', (reason, detail) => {
					const d = detail as { kind?: Refusal['kind']; local?: boolean } | undefined;
					this.#refusal = {
						reason: typeof reason === 'string' ? reason : 'refused by the server',
						kind: d?.kind ?? 'join',
						at: Date.now(),
						local: !!d?.local
					};
					read();
				})
			);
			this.#cleanup.push(
				provider.on('set-aside', (entries: SetAsideEntry[]) => {
					if (this.#boardId) this.#setAside = addSetAside(this.#boardId, entries);
					else this.#setAside = [...this.#setAside, ...entries];
				})
			);
			this.#cleanup.push(
				provider.on('overwritten', (n: OverwriteNotice) => {
					this.#overwrites = [...this.#overwrites.filter((o) => !(o.itemId === n.itemId && o.field === n.field)), n];
				})
			);
			// After a refused change the provider continues on a fresh copy of the server's state.
			this.#cleanup.push(
				provider.on('doc', (fresh) => {
					if (fresh && fresh !== this.#doc) this.#bind(fresh as Y.Doc);
				})
			);
			read();
		}
	}

	#bind(doc: Y.Doc) {
		this.#unbindDoc?.();
		this.#undo?.destroy();
		this.#doc = doc;
		setEditor(doc, this.#user.name);
		const undo = createUndoManager(doc);
		this.#undo = undo;
		// Each transaction re-reads only the items it touched.
		const live = new LiveSnapshot(doc, (s) => (this.#snapshot = s));
		this.#snapshot = live.board;
		const stacks = () => {
			this.#canUndo = undo.canUndo();
			this.#canRedo = undo.canRedo();
		};
		for (const ev of ['stack-item-added', 'stack-item-popped', 'stack-cleared'] as const) undo.on(ev, stacks);
		this.#unbindDoc = () => {
			live.destroy();
			for (const ev of ['stack-item-added', 'stack-item-popped', 'stack-cleared'] as const) undo.off(ev, stacks);
		};
		stacks();
	}

	/** The document being edited; it changes only after the server refused a change. */
	get doc(): Y.Doc {
		return this.#doc;
	}
	get board(): BoardSnapshot {
		return this.#snapshot;
	}
	get canUndo() {
		return this.#canUndo;
	}
	get canRedo() {
		return this.#canRedo;
	}
	get sync(): SyncState {
		return this.#sync;
	}
	/** The last refusal by the server, to tell the person why. */
	get refusal(): Refusal | null {
		return this.#refusal;
	}
	get peers(): Peer[] {
		return this.#peers;
	}
	get online(): boolean {
		return this.#provider !== null;
	}

	dismissRefusal() {
		this.#refusal = null;
	}

	/** Work the server (or the board policy here) did not accept, kept on this device. */
	get setAside(): SetAsideEntry[] {
		return this.#setAside;
	}

	/** Values set offline that someone else's concurrent edit replaced. */
	get overwrites(): OverwriteNotice[] {
		return this.#overwrites;
	}

	#keepSetAside(list: SetAsideEntry[]) {
		this.#setAside = list;
		if (this.#boardId) writeSetAside(this.#boardId, list);
		if (list.length === 0) void this.#provider?.forgetEarlierCopies?.();
	}

	discardSetAside(id: string) {
		this.#keepSetAside(this.#setAside.filter((e) => e.id !== id));
	}

	/**
	 * Turns work that was not accepted into a new proposal: a new point (or zone, or scale) with
	 * what the person had entered, beside the original. Returns the new item's id, or null when
	 * nothing could be proposed (e.g. a deletion); the entry stays in the tray then.
	 */
	proposeFromSetAside(id: string, createdBy = ''): string | null {
		const entry = this.#setAside.find((e) => e.id === id);
		if (!entry || entry.action === 'deleted') return null;
		const doc = this.#doc;
		let created: string | null = null;
		if (entry.kind === 'point') {
			const patch: Record<string, unknown> = {};
			for (const k of PROPOSAL_FIELDS) {
				const r = (pointPatchSchema.shape as Record<string, { safeParse(v: unknown): { success: boolean; data?: unknown } }>)[k].safeParse(
					entry.item[k]
				);
				if (entry.item[k] !== undefined && r.success) patch[k] = r.data;
			}
			const x = Number(entry.item.x);
			const y = Number(entry.item.y);
			if (!Number.isFinite(x) || !Number.isFinite(y)) return null;
			created = addPoint(doc, { ...patch, x: x + 24, y: y + 24, createdBy });
		} else if (entry.kind === 'zone') {
			const polygon = entry.item.polygon as Vec2[] | undefined;
			if (!Array.isArray(polygon)) return null;
			const fields = zonePatchSchema.safeParse({ label: entry.item.label, kind: entry.item.kind });
			created = addZone(doc, { ...(fields.success ? fields.data : {}), polygon });
		} else if (entry.kind === 'scale') {
			setScale(doc, entry.item as unknown as ScaleData);
			created = 'scale';
		} else {
			return null;
		}
		// The board policy may have refused the new item too; then it is in the tray again.
		if (doc !== this.#doc) return null;
		this.discardSetAside(id);
		return created;
	}

	/** Puts back the value the person had set, over the one that replaced it. */
	restoreOverwritten(id: string): boolean {
		const n = this.#overwrites.find((o) => o.id === id);
		if (!n) return false;
		const m = maps(this.#doc);
		const root = n.kind === 'point' ? m.points : n.kind === 'route' ? m.routes : m.zones;
		const item = root.get(n.itemId);
		if (!(item instanceof Y.Map)) return false;
		this.#doc.transact(() => {
			if (n.mine === undefined) item.delete(n.field);
			else item.set(n.field, n.mine);
			item.set('updatedBy', this.#user.name);
			item.set('updatedAt', Date.now());
		}, LOCAL_ORIGIN);
		this.dismissOverwrite(id);
		return true;
	}

	dismissOverwrite(id: string) {
		this.#overwrites = this.#overwrites.filter((o) => o.id !== id);
	}

	/** Shares the pointer position (image coordinates), at most every 40 ms. */
	setCursor(p: Vec2 | null) {
		this.#pendingCursor = p;
		if (this.#cursorTimer) return;
		const flush = () => {
			this.#cursorTimer = null;
			if (this.#pendingCursor === undefined) return;
			const c = this.#pendingCursor;
			this.#pendingCursor = undefined;
			this.awareness.setLocalStateField('cursor', c ? { x: Math.round(c[0] * 10) / 10, y: Math.round(c[1] * 10) / 10 } : null);
			this.#cursorTimer = setTimeout(flush, CURSOR_INTERVAL_MS);
		};
		flush();
	}

	setSelection(ids: string[]) {
		this.awareness.setLocalStateField('selection', ids);
	}

	undoLast() {
		this.#undo?.undo();
	}

	redoLast() {
		this.#undo?.redo();
	}

	reconnect() {
		this.#provider?.connect();
	}

	async destroy() {
		if (this.#cursorTimer) clearTimeout(this.#cursorTimer);
		for (const f of this.#cleanup.splice(0)) f();
		this.#unbindDoc?.();
		this.#undo?.destroy();
		if (this.#provider) await this.#provider.destroy();
		else this.awareness.destroy();
	}
}
