// Where the "not accepted" tray lives on the device: localStorage in the browser (it survives a
// reload, sign-out and a refusal, as the offline copy does), memory elsewhere.
import type { SetAsideEntry } from './set-aside';

const PREFIX = 'spotface-set-aside-';
const memory = new Map<string, SetAsideEntry[]>();
/** A tray holds at most this many entries; the oldest go first beyond it. */
export const MAX_SET_ASIDE = 200;

function storage(): Storage | null {
	try {
		return typeof localStorage === 'undefined' ? null : localStorage;
	} catch {
		return null;
	}
}

export function readSetAside(boardId: string): SetAsideEntry[] {
	const s = storage();
	if (!s) return memory.get(boardId) ?? [];
	try {
		const raw = s.getItem(PREFIX + boardId);
		const list = raw ? (JSON.parse(raw) as unknown) : [];
		return Array.isArray(list)
			? (list as SetAsideEntry[]).filter((e) => e && typeof e.id === 'string' && typeof e.reason === 'string')
			: [];
	} catch {
		return [];
	}
}

export function writeSetAside(boardId: string, entries: SetAsideEntry[]): void {
	const list = entries.slice(-MAX_SET_ASIDE);
	const s = storage();
	if (!s) {
		memory.set(boardId, list);
		return;
	}
	try {
		if (list.length) s.setItem(PREFIX + boardId, JSON.stringify(list));
		else s.removeItem(PREFIX + boardId);
	} catch (e) {
		// Storage full: keep it for this page at least.
		memory.set(boardId, list);
		console.error('[board] could not keep the not-accepted tray on this device:', e);
	}
}

export function addSetAside(boardId: string, entries: SetAsideEntry[]): SetAsideEntry[] {
	const all = [...readSetAside(boardId), ...entries];
	writeSetAside(boardId, all);
	return readSetAside(boardId);
}
