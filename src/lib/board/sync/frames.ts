// The one place that builds and reads the live board's frames, for the server
// (src/lib/server/collab) and the client (provider.ts) alike, so the two cannot drift apart.
// A frame is y-websocket's: a varUint message type (protocol.ts), then the y-protocols message.
import * as Y from 'yjs';
import * as decoding from 'lib0/decoding';
import * as encoding from 'lib0/encoding';
import * as syncProtocol from 'y-protocols/sync';
import { MESSAGE_AWARENESS, MESSAGE_SYNC } from './protocol';

/** A frame that is short, long or of an unknown kind. */
export class Malformed extends Error {}

function sync(write: (e: encoding.Encoder) => void): Uint8Array {
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, MESSAGE_SYNC);
	write(e);
	return encoding.toUint8Array(e);
}

/** Sync step 1: the sender's state vector, asking for what it lacks. */
export function syncStep1Frame(doc: Y.Doc): Uint8Array {
	return sync((e) => syncProtocol.writeSyncStep1(e, doc));
}

/** Sync step 2: what `doc` holds beyond `stateVector`. */
export function syncStep2Frame(doc: Y.Doc, stateVector: Uint8Array): Uint8Array {
	return sync((e) => {
		encoding.writeVarUint(e, syncProtocol.messageYjsSyncStep2);
		encoding.writeVarUint8Array(e, Y.encodeStateAsUpdate(doc, stateVector));
	});
}

/** One document update. */
export function syncUpdateFrame(update: Uint8Array): Uint8Array {
	return sync((e) => syncProtocol.writeUpdate(e, update));
}

/** A presence (awareness) update. */
export function awarenessFrame(update: Uint8Array): Uint8Array {
	const e = encoding.createEncoder();
	encoding.writeVarUint(e, MESSAGE_AWARENESS);
	encoding.writeVarUint8Array(e, update);
	return encoding.toUint8Array(e);
}

/** The document update inside a sync frame (step 2 or update) this side built. */
export function updateOfFrame(frame: Uint8Array): Uint8Array {
	const d = decoding.createDecoder(frame);
	decoding.readVarUint(d); // MESSAGE_SYNC
	decoding.readVarUint(d); // step 2 or update
	return decoding.readVarUint8Array(d);
}

export function assertConsumed(d: decoding.Decoder) {
	if (decoding.hasContent(d)) throw new Malformed('trailing bytes after the message');
}

export type Frame =
	{ kind: 'step1'; stateVector: Uint8Array } | { kind: 'update'; update: Uint8Array } | { kind: 'awareness'; update: Uint8Array };

/** Reads one frame strictly (the server's side): anything short, long or unknown is Malformed. */
export function parseFrame(bytes: Uint8Array): Frame {
	try {
		const d = decoding.createDecoder(bytes);
		const type = decoding.readVarUint(d);
		let frame: Frame;
		if (type === MESSAGE_SYNC) {
			const step = decoding.readVarUint(d);
			if (step === syncProtocol.messageYjsSyncStep1) {
				frame = { kind: 'step1', stateVector: decoding.readVarUint8Array(d) };
				Y.decodeStateVector(frame.stateVector);
			} else if (step === syncProtocol.messageYjsSyncStep2 || step === syncProtocol.messageYjsUpdate) {
				frame = { kind: 'update', update: decoding.readVarUint8Array(d) };
			} else throw new Malformed(`unknown sync step ${step}`);
		} else if (type === MESSAGE_AWARENESS) {
			frame = { kind: 'awareness', update: decoding.readVarUint8Array(d) };
		} else throw new Malformed(`unknown message type ${type}`);
		assertConsumed(d);
		return frame;
	} catch (e) {
		throw e instanceof Malformed ? e : new Malformed((e as Error).message);
	}
}

export type Received =
	/** A sync step 1 was answered: `reply` is the step 2 to send back. */
	| { kind: 'step1'; reply: Uint8Array }
	/** A sync step 2 or update, applied to the document with `origin`. */
	| { kind: 'step2' | 'update' }
	| { kind: 'awareness'; update: Uint8Array }
	| { kind: 'unknown' };

/** Reads a frame from the server (the client's side): sync messages are applied to `doc` at once. */
export function receiveFrame(bytes: Uint8Array, doc: Y.Doc, origin: unknown): Received {
	const d = decoding.createDecoder(bytes);
	const type = decoding.readVarUint(d);
	if (type === MESSAGE_SYNC) {
		const reply = encoding.createEncoder();
		encoding.writeVarUint(reply, MESSAGE_SYNC);
		const step = syncProtocol.readSyncMessage(d, reply, doc, origin);
		if (step === syncProtocol.messageYjsSyncStep1) return { kind: 'step1', reply: encoding.toUint8Array(reply) };
		return { kind: step === syncProtocol.messageYjsSyncStep2 ? 'step2' : 'update' };
	}
	if (type === MESSAGE_AWARENESS) return { kind: 'awareness', update: decoding.readVarUint8Array(d) };
	return { kind: 'unknown' };
}
