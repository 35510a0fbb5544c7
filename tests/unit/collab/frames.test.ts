// The frames module is the one place both sides build and read live board frames: what one
// side builds, the other reads back the same, and the server's strict reader refuses the rest.
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { Awareness, encodeAwarenessUpdate } from 'y-protocols/awareness';
import {
	Malformed,
	awarenessFrame,
	parseFrame,
	receiveFrame,
	syncStep1Frame,
	syncStep2Frame,
	syncUpdateFrame,
	updateOfFrame
} from '../../../src/lib/board/sync/frames';

function docWith(entries: Record<string, number>) {
	const doc = new Y.Doc();
	for (const [k, v] of Object.entries(entries)) doc.getMap('points').set(k, v);
	return doc;
}

describe('frames', () => {
	it('a client’s step 1 is read by the server, whose step 2 brings the client what it lacks', () => {
		const server = docWith({ a: 1, b: 2 });
		const client = new Y.Doc();
		const step1 = parseFrame(syncStep1Frame(client));
		expect(step1.kind).toBe('step1');
		if (step1.kind !== 'step1') return;
		const step2 = syncStep2Frame(server, step1.stateVector);
		expect(parseFrame(step2).kind).toBe('update');
		expect(receiveFrame(step2, client, 'test')).toEqual({ kind: 'step2' });
		expect(client.getMap('points').toJSON()).toEqual({ a: 1, b: 2 });
	});

	it('the server’s step 1 is answered by the client with its own step 2', () => {
		const server = new Y.Doc();
		const client = docWith({ offline: 7 });
		const r = receiveFrame(syncStep1Frame(server), client, 'test');
		expect(r.kind).toBe('step1');
		if (r.kind !== 'step1') return;
		const parsed = parseFrame(r.reply);
		expect(parsed.kind).toBe('update');
		if (parsed.kind !== 'update') return;
		Y.applyUpdate(server, parsed.update);
		expect(server.getMap('points').toJSON()).toEqual({ offline: 7 });
	});

	it('an update frame carries the update unchanged both ways', () => {
		const doc = docWith({ p: 1 });
		const update = Y.encodeStateAsUpdate(doc);
		const frame = syncUpdateFrame(update);
		expect(updateOfFrame(frame)).toEqual(update);
		const parsed = parseFrame(frame);
		expect(parsed).toEqual({ kind: 'update', update });
		const other = new Y.Doc();
		expect(receiveFrame(frame, other, 'test')).toEqual({ kind: 'update' });
		expect(other.getMap('points').toJSON()).toEqual({ p: 1 });
	});

	it('a presence frame carries the awareness update', () => {
		const awareness = new Awareness(new Y.Doc());
		awareness.setLocalState({ user: { name: 'Esme' } });
		const update = encodeAwarenessUpdate(awareness, [awareness.clientID]);
		const frame = awarenessFrame(update);
		expect(parseFrame(frame)).toEqual({ kind: 'awareness', update });
		expect(receiveFrame(frame, new Y.Doc(), 'test')).toEqual({ kind: 'awareness', update });
	});

	it('the strict reader refuses trailing bytes, truncation, unknown kinds and steps', () => {
		const good = syncUpdateFrame(Y.encodeStateAsUpdate(docWith({ p: 1 })));
		expect(() => parseFrame(new Uint8Array([...good, 0]))).toThrow(Malformed);
		expect(() => parseFrame(good.slice(0, good.length - 2))).toThrow(Malformed);
		expect(() => parseFrame(new Uint8Array([7, 0]))).toThrow(/unknown message type 7/);
		expect(() => parseFrame(new Uint8Array([0, 9, 0]))).toThrow(/unknown sync step 9/);
		expect(() => parseFrame(new Uint8Array([]))).toThrow(Malformed);
	});
});
