// The stored state the board page fetches before the live sync joins: its framing, and how the
// provider takes it (as the server's, never sent back nor counted as the person's change, and
// in the board policy's view before the person's next change is checked).
import { afterEach, describe, expect, test } from 'vitest';
import * as Y from 'yjs';
import { addPoint, decidePoint, maps, readBoard, updatePoint } from '../../../src/lib/board/model';
import { BoardProvider, type RefusalDetail } from '../../../src/lib/board/sync/provider';
import { policyCheck } from '../../../src/lib/board/sync/policy-check';
import { decodeStoredState, encodeStoredState } from '../../../src/lib/board/sync/stored-state';

const open: BoardProvider[] = [];
afterEach(async () => {
	await Promise.all(open.splice(0).map((p) => p.destroy()));
});

/** What storage holds: a snapshot with an approved P1 and a proposed P2, and one log row adding P3. */
function stored() {
	const doc = new Y.Doc();
	const p1 = addPoint(doc, { x: 100, y: 100, label: 'P1', flatDiameterMm: 40 });
	const p2 = addPoint(doc, { x: 300, y: 100, label: 'P2' });
	decidePoint(doc, p1, 'approved', { userId: 'u-eng', name: 'Esme Engineer' }, 1_700_000_000_000);
	const snapshot = Y.encodeStateAsUpdate(doc);
	const before = Y.encodeStateVector(doc);
	const p3 = addPoint(doc, { x: 500, y: 100, label: 'P3' });
	const row = Y.encodeStateAsUpdate(doc, before);
	return { doc, p1, p2, p3, updates: [snapshot, row] };
}

function provider(check?: ReturnType<typeof policyCheck>) {
	const p = new BoardProvider({ serverUrl: 'http://127.0.0.1:9', boardId: 'b-1', doc: new Y.Doc(), offline: false, connect: false, check });
	open.push(p);
	return p;
}

const technician = () => policyCheck({ role: 'technician', userId: 'u-tech', name: 'Theo Technician' }, () => ({ frozen: false }));

describe('stored state framing', () => {
	test('updates come back as they went in, in order', () => {
		const { updates } = stored();
		const back = decodeStoredState(encodeStoredState(updates));
		expect(back).toHaveLength(2);
		expect(back.map((u) => [...u])).toEqual(updates.map((u) => [...u]));
		expect(decodeStoredState(encodeStoredState([]))).toEqual([]);
	});

	test('a body cut short is refused, not read as less', () => {
		const bytes = encodeStoredState(stored().updates);
		expect(() => decodeStoredState(bytes.slice(0, bytes.byteLength - 10))).toThrow();
	});
});

describe('BoardProvider.applyStoredState', () => {
	test('the board is there, taken as the server’s: nothing unsynced', () => {
		const { doc, updates } = stored();
		const p = provider(technician());
		let updatesSeen = 0;
		p.doc.on('update', () => updatesSeen++);
		expect(p.applyStoredState(updates)).toBe(2);
		expect(readBoard(p.doc)).toEqual(readBoard(doc));
		expect(p.unsynced).toBe(0);
		expect(updatesSeen).toBe(1); // one transaction for all of it
	});

	test('an update that does not apply is skipped and the rest is kept', () => {
		const { doc, updates } = stored();
		const p = provider();
		expect(p.applyStoredState([updates[0], new Uint8Array([0xff, 0xff, 0xff, 0xff, 0x0f]), updates[1]])).toBe(2);
		expect(readBoard(p.doc).points.map((x) => x.label)).toEqual(readBoard(doc).points.map((x) => x.label));
	});

	test("the policy sees the stored board at the person's next change: an approved point stays locked", () => {
		const { p1, p2, updates } = stored();
		const p = provider(technician());
		p.applyStoredState(updates);
		const refusals: Array<[string, RefusalDetail]> = [];
		p.on('refused', (reason: string, detail: RefusalDetail) => refusals.push([reason, detail]));

		// Allowed: a proposed point.
		updatePoint(p.doc, p2, { notes: 'checked on site' });
		expect(refusals).toEqual([]);
		expect(p.unsynced).toBe(1);

		// Refused on this device: the approved point.
		updatePoint(p.doc, p1, { notes: 'moved it a bit' });
		expect(refusals).toHaveLength(1);
		expect(refusals[0][1]).toMatchObject({ kind: 'update', local: true });
		expect(refusals[0][0]).toMatch(/approved/);
		const now = readBoard(p.doc);
		expect(now.points.find((x) => x.id === p1)?.notes).toBe('');
		expect(now.points.find((x) => x.id === p2)?.notes).toBe('checked on site');
		expect(maps(p.doc).points.size).toBe(3);
	});
});
