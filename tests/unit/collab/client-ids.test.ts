// Client ids belong to the member who introduced them on a board.
import { describe, expect, test } from 'vitest';
import * as Y from 'yjs';
import { checkOwnership, REASON_FORGED, structClientIds } from '../../../src/lib/server/collab/client-ids';

describe('client id ownership', () => {
	test('the ids an update writes under are its structs’ ids, not those it deletes', () => {
		const a = new Y.Doc();
		a.clientID = 11;
		a.getMap('points').set('p1', 1);
		const b = new Y.Doc();
		b.clientID = 22;
		Y.applyUpdate(b, Y.encodeStateAsUpdate(a));
		const before = Y.encodeStateVector(b);
		let update: Uint8Array | null = null;
		b.on('update', (u: Uint8Array) => (update = u));
		b.transact(() => {
			b.getMap('points').delete('p1');
			b.getMap('points').set('p2', 2);
		});
		expect([...structClientIds(Y.decodeUpdate(update!))]).toEqual([22]);
		expect([...structClientIds(Y.decodeUpdate(Y.encodeStateAsUpdate(b, before)))]).toEqual([22]);
	});

	test('a new id is claimed; an own id is fine; someone else’s or an unclaimed id the board holds is refused', () => {
		const owners = new Map([
			[1, 'tech'],
			[2, 'engineer']
		]);
		const known = new Map([
			[1, 5],
			[2, 9],
			[3, 4]
		]);
		expect(checkOwnership(owners, known, 'tech', [1, 7])).toEqual({ ok: true, claim: [7] });
		expect(checkOwnership(owners, known, 'tech', [2])).toEqual({ ok: false, clientId: 2, reason: REASON_FORGED });
		expect(checkOwnership(owners, known, 'engineer', [3])).toEqual({ ok: false, clientId: 3, reason: REASON_FORGED });
		expect(checkOwnership(owners, known, 'engineer', [2])).toEqual({ ok: true, claim: [] });
	});
});
