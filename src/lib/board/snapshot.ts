// Keeps a board's plain snapshot in step with its Y.Doc by reading only the items a transaction
// touched, instead of the whole board on every update. Unchanged items keep their object, so
// code downstream (findings, drawing) can tell what changed by identity. The result always
// equals `readBoard(doc)`.
import * as Y from 'yjs';
import {
	maps,
	readPoint,
	readRoute,
	readScale,
	readZone,
	type BoardPoint,
	type BoardRoute,
	type BoardSnapshot,
	type BoardZone
} from './model';
import { MAP_META, MAP_POINTS, MAP_ROUTES, MAP_ZONES } from './model/schema';

type Item = { id: string; createdAt: number };

const byCreation = (a: Item, b: Item) => a.createdAt - b.createdAt || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

class ItemTable<T extends Item> {
	readonly items = new Map<string, T>();
	#list: T[] = [];
	#dirty = true;
	constructor(
		private root: Y.Map<Y.Map<unknown>>,
		private read: (id: string, m: Y.Map<unknown>) => T | null
	) {
		root.forEach((_, id) => this.refresh(id));
	}
	/** Reads one item again; true when the table changed. */
	refresh(id: string): boolean {
		const value = this.root.get(id);
		const next = value instanceof Y.Map ? this.read(id, value) : null;
		const had = this.items.has(id);
		if (next) this.items.set(id, next);
		else if (had) this.items.delete(id);
		else return false;
		this.#dirty = true;
		return true;
	}
	list(): T[] {
		if (this.#dirty) {
			this.#list = [...this.items.values()].sort(byCreation);
			this.#dirty = false;
		}
		return this.#list;
	}
}

export class LiveSnapshot {
	#doc: Y.Doc;
	#points: ItemTable<BoardPoint>;
	#routes: ItemTable<BoardRoute>;
	#zones: ItemTable<BoardZone>;
	#snapshot: BoardSnapshot;
	#onChange: (s: BoardSnapshot) => void;
	#observer: (events: Array<Y.YEvent<Y.AbstractType<unknown>>>, txn: Y.Transaction) => void;

	constructor(doc: Y.Doc, onChange: (s: BoardSnapshot) => void) {
		this.#doc = doc;
		this.#onChange = onChange;
		const m = maps(doc);
		this.#points = new ItemTable(m.points, readPoint);
		this.#routes = new ItemTable(m.routes, readRoute);
		this.#zones = new ItemTable(m.zones, readZone);
		this.#snapshot = this.#compose(true, true, true, true);
		this.#observer = (events) => this.#apply(events);
		for (const root of [m.points, m.routes, m.zones, m.meta]) root.observeDeep(this.#observer);
	}

	get board(): BoardSnapshot {
		return this.#snapshot;
	}

	destroy() {
		const m = maps(this.#doc);
		for (const root of [m.points, m.routes, m.zones, m.meta]) root.unobserveDeep(this.#observer);
	}

	#apply(events: Array<Y.YEvent<Y.AbstractType<unknown>>>) {
		const touched = { [MAP_POINTS]: new Set<string>(), [MAP_ROUTES]: new Set<string>(), [MAP_ZONES]: new Set<string>() };
		let meta = false;
		for (const e of events) {
			// The root map's own keys (items added or removed), or a field inside one item.
			const path = e.path;
			const target = e.target;
			const rootName = rootOf(this.#doc, target);
			if (rootName === MAP_META) {
				meta = true;
				continue;
			}
			if (!rootName) continue;
			const set = touched[rootName as keyof typeof touched];
			if (path.length === 0) for (const k of (e as Y.YMapEvent<unknown>).keysChanged) set.add(k);
			else if (typeof path[0] === 'string') set.add(path[0]);
		}
		let p = false;
		let r = false;
		let z = false;
		for (const id of touched[MAP_POINTS]) p = this.#points.refresh(id) || p;
		for (const id of touched[MAP_ROUTES]) r = this.#routes.refresh(id) || r;
		for (const id of touched[MAP_ZONES]) z = this.#zones.refresh(id) || z;
		if (!p && !r && !z && !meta) return;
		this.#snapshot = this.#compose(p, r || p, z, meta);
		this.#onChange(this.#snapshot);
	}

	#compose(points: boolean, routes: boolean, zones: boolean, meta: boolean): BoardSnapshot {
		const prev = this.#snapshot as BoardSnapshot | undefined;
		const pointMap = maps(this.#doc).points;
		const pts = points || !prev ? this.#points.list() : prev.points;
		return {
			points: pts,
			// A route whose point is gone is not on the board (as readBoard has it).
			routes: routes || !prev ? this.#routes.list().filter((x) => pointMap.has(x.pointId)) : prev.routes,
			zones: zones || !prev ? this.#zones.list() : prev.zones,
			scale: meta || !prev ? readScale(this.#doc) : prev.scale
		};
	}
}

function rootOf(doc: Y.Doc, type: Y.AbstractType<unknown>): string | null {
	let t: Y.AbstractType<unknown> = type;
	while (t._item && t._item.parent) t = t._item.parent as Y.AbstractType<unknown>;
	for (const name of [MAP_POINTS, MAP_ROUTES, MAP_ZONES, MAP_META]) if ((doc.share.get(name) as unknown) === t) return name;
	return null;
}
