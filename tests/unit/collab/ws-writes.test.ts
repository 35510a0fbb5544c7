// socket.io over WebSocket with coalesced writes (src/lib/server/collab/ws-writes.ts): a message
// with binary content (a text frame and a binary frame) leaves the server in one write to the
// TCP socket, messages arrive complete and in order, and a long-polling client still works.
import { afterEach, describe, expect, it } from 'vitest';
import { createServer, type Server as HttpServer } from 'node:http';
import type { AddressInfo, Socket as NetSocket } from 'node:net';
import { Server } from 'socket.io';
import { io as connect, type Socket as ClientSocket } from 'socket.io-client';
import { coalesceWebSocketWrites } from '../../../src/lib/server/collab/ws-writes';

let http: HttpServer | null = null;
let io: Server | null = null;
const clients: ClientSocket[] = [];

afterEach(async () => {
	for (const c of clients.splice(0)) c.close();
	await new Promise<void>((r) => (io ? io.close(() => r()) : r()));
	io = null;
	http = null;
});

async function serve(coalesced: boolean) {
	http = createServer();
	io = new Server(http);
	if (coalesced) coalesceWebSocketWrites(io);
	await new Promise<void>((r) => http!.listen(0, '127.0.0.1', () => r()));
	return `http://127.0.0.1:${(http.address() as AddressInfo).port}`;
}

/** Counts the writes (system calls) the server makes on each TCP socket, keyed by the socket. */
function countWrites(raw: NetSocket): () => number {
	let n = 0;
	const s = raw as NetSocket & { _writeGeneric: (...a: unknown[]) => unknown };
	const original = s._writeGeneric.bind(s);
	s._writeGeneric = (...a: unknown[]) => {
		n++;
		return original(...a);
	};
	return () => n;
}

async function sendAndCount(coalesced: boolean, messages: number) {
	const url = await serve(coalesced);
	const connected = new Promise<NetSocket>((resolve) =>
		io!.on('connection', (s) => resolve((s.conn as unknown as { transport: { socket: { _socket: NetSocket } } }).transport.socket._socket))
	);
	const client = connect(url, { transports: ['websocket'] });
	clients.push(client);
	const raw = await connected;
	const got: number[] = [];
	const all = new Promise<void>((resolve) =>
		client.on('m', (b: ArrayBuffer) => {
			got.push(new Uint8Array(b)[0]);
			if (got.length === messages) resolve();
		})
	);
	const writes = countWrites(raw);
	for (let i = 0; i < messages; i++) {
		io!.emit('m', new Uint8Array([i, 1, 2, 3]));
		// One message per tick, as a board's peers get them.
		await new Promise((r) => setImmediate(r));
	}
	await all;
	return { writes: writes(), got };
}

describe('coalesced WebSocket writes', () => {
	it('sends a binary message (two frames) in one write instead of two', async () => {
		const plain = await sendAndCount(false, 20);
		expect(plain.got).toEqual([...Array(20).keys()]);
		expect(plain.writes).toBe(40);
		await new Promise<void>((r) => io!.close(() => r()));
		io = null;
		const coalesced = await sendAndCount(true, 20);
		expect(coalesced.got).toEqual([...Array(20).keys()]);
		expect(coalesced.writes).toBe(20);
	});

	it('keeps order when many messages go out in one tick, in fewer writes', async () => {
		const url = await serve(true);
		const client = connect(url, { transports: ['websocket'] });
		clients.push(client);
		await new Promise<void>((r) => client.on('connect', () => r()));
		const got: number[] = [];
		const done = new Promise<void>((resolve) =>
			client.on('m', (b: ArrayBuffer, text: string) => {
				got.push(new Uint8Array(b)[0]);
				expect(text).toBe(`n${new Uint8Array(b)[0]}`);
				if (got.length === 200) resolve();
			})
		);
		for (let i = 0; i < 200; i++) io!.emit('m', new Uint8Array([i % 256]), `n${i % 256}`);
		await done;
		expect(got).toEqual([...Array(200).keys()]);
	});

	it('leaves long-polling connections working, and upgrades them', async () => {
		const url = await serve(true);
		const client = connect(url, { transports: ['polling', 'websocket'] });
		clients.push(client);
		await new Promise<void>((r) => client.on('connect', () => r()));
		const echo = (n: number) =>
			new Promise<number>((resolve) => {
				client.once('m', (b: ArrayBuffer) => resolve(new Uint8Array(b)[0]));
				io!.emit('m', new Uint8Array([n]));
			});
		expect(await echo(7)).toBe(7);
		await new Promise<void>((r) => (client.io.engine.transport.name === 'websocket' ? r() : client.io.engine.once('upgrade', () => r())));
		expect(await echo(9)).toBe(9);
	});
});
