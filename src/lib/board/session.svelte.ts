// Bridges one board's Y.Doc, its undo manager and its sync provider to Svelte: a fresh,
// validated snapshot after every change, the connection state, and who else is here.
import type * as Y from 'yjs';
import { Awareness } from 'y-protocols/awareness';
import type { Vec2 } from '../trade';
import { createUndoManager, readBoard, type BoardSnapshot } from './model';

/* eslint-disable @typescript-eslint/no-explicit-any */

export type ConnectionStatus = 'local' | 'connecting' | 'connected' | 'disconnected' | 'refused';

/** What the board needs from the sync provider (src/lib/board/sync/provider.ts). */
export interface BoardSyncProvider {
	readonly awareness: Awareness;
	readonly status: 'connecting' | 'connected' | 'disconnected' | 'refused';
	readonly synced: boolean;
	readonly unsynced: number;
	readonly readOnly: boolean;
	readonly readOnlyReason?: string | null;
	/** Why the server is not storing changes just now (they are kept and sent again). */
	readonly delayed?: string | null;
	on(event: 'status' | 'synced' | 'unsynced' | 'refused' | 'readonly' | 'doc' | 'delayed', cb: (...args: any[]) => void): () => void;
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
}

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
	#cleanup: Array<() => void> = [];
	#unbindDoc: (() => void) | null = null;
	#cursorTimer: ReturnType<typeof setTimeout> | null = null;
	#pendingCursor: Vec2 | null | undefined = undefined;

	constructor(doc: Y.Doc, provider: BoardSyncProvider | null, user: BoardUser) {
		this.#provider = provider;
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
					const kind = (detail as { kind?: Refusal['kind'] } | undefined)?.kind ?? 'join';
					this.#refusal = { reason: typeof reason === 'string' ? reason : 'refused by the server', kind, at: Date.now() };
					read();
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
		const undo = createUndoManager(doc);
		this.#undo = undo;
		const refresh = () => (this.#snapshot = readBoard(doc));
		const stacks = () => {
			this.#canUndo = undo.canUndo();
			this.#canRedo = undo.canRedo();
		};
		doc.on('update', refresh);
		for (const ev of ['stack-item-added', 'stack-item-popped', 'stack-cleared'] as const) undo.on(ev, stacks);
		this.#unbindDoc = () => {
			doc.off('update', refresh);
			for (const ev of ['stack-item-added', 'stack-item-popped', 'stack-cleared'] as const) undo.off(ev, stacks);
		};
		refresh();
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
