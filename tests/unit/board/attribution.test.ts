// Each change an operation makes is signed with the editor's name, and the board policy refuses
// a change signed with someone else's.
import { expect, test } from 'vitest';
import * as Y from 'yjs';
import { addPoint, checkBoardChange, maps, movePoint, readBoard, setEditor, updatePoint } from '../../../src/lib/board/model';

function updateOf(doc: Y.Doc, change: () => void): Uint8Array {
	let out: Uint8Array | null = null;
	const on = (u: Uint8Array) => (out = u);
	doc.on('update', on);
	change();
	doc.off('update', on);
	return out!;
}

test('operations sign the items they change with the editor of the document', () => {
	const doc = new Y.Doc();
	setEditor(doc, 'Teo Technician');
	const id = addPoint(doc, { x: 10, y: 10 });
	expect(maps(doc).points.get(id)!.get('updatedBy')).toBe('Teo Technician');
	setEditor(doc, 'Esme Engineer');
	movePoint(doc, id, 20, 20);
	expect(maps(doc).points.get(id)!.get('updatedBy')).toBe('Esme Engineer');
	expect(typeof maps(doc).points.get(id)!.get('updatedAt')).toBe('number');
	expect(readBoard(doc).points[0]).toMatchObject({ x: 20, y: 20 });
});

test('the policy accepts a change signed with the actor’s own name and refuses one signed with another', () => {
	const doc = new Y.Doc();
	const id = addPoint(doc, { x: 10, y: 10 });
	const tech = { role: 'technician', userId: 'u-tech', name: 'Teo Technician' };
	const copy = () => {
		const c = new Y.Doc();
		Y.applyUpdate(c, Y.encodeStateAsUpdate(doc));
		return c;
	};
	const own = copy();
	setEditor(own, 'Teo Technician');
	const good = updateOf(own, () => updatePoint(own, id, { notes: 'rusty seat' }));
	expect(checkBoardChange(doc, good, tech, { frozen: false })).toEqual({ ok: true });
	const forged = copy();
	setEditor(forged, 'Esme Engineer');
	const bad = updateOf(forged, () => updatePoint(forged, id, { notes: 'rusty seat' }));
	const r = checkBoardChange(doc, bad, tech, { frozen: false });
	expect(r.ok).toBe(false);
	if (!r.ok) expect(r.refusals[0]).toMatchObject({ code: 'rights.attribution', field: 'updatedBy' });
});
