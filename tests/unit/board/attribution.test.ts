// Each change an operation makes is signed with the editor's name (shown when someone's value
// replaced another's). Authorship itself rests on client-id ownership on the server; the name is
// a label, so undo may put back an earlier one.
import { expect, test } from 'vitest';
import * as Y from 'yjs';
import {
	addPoint,
	checkBoardChange,
	createUndoManager,
	maps,
	movePoint,
	readBoard,
	setEditor,
	updatePoint
} from '../../../src/lib/board/model';

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

test('undo of an edit puts back the earlier signer, and the policy accepts it', () => {
	const server = new Y.Doc();
	setEditor(server, 'Teo Technician');
	const id = addPoint(server, { x: 10, y: 10 });
	const laptop = new Y.Doc();
	Y.applyUpdate(laptop, Y.encodeStateAsUpdate(server));
	setEditor(laptop, 'Esme Engineer');
	const undo = createUndoManager(laptop);
	updatePoint(laptop, id, { surface: 'sheet_cover' });
	Y.applyUpdate(server, Y.encodeStateAsUpdate(laptop, Y.encodeStateVector(server)));
	let update: Uint8Array | null = null;
	laptop.on('update', (u: Uint8Array) => (update = u));
	undo.undo();
	expect(maps(laptop).points.get(id)!.get('updatedBy')).toBe('Teo Technician');
	expect(checkBoardChange(server, update!, { role: 'engineer', userId: 'u-eng', name: 'Esme Engineer' }, { frozen: false })).toEqual({
		ok: true
	});
});
