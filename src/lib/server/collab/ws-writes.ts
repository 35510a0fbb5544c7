// Fewer writes to the network for socket.io over WebSocket.
//
// socket.io sends a message with binary content (every board update) as two WebSocket frames: a
// text frame naming the event and the binary frame itself. engine.io writes one frame, then holds
// the next until the first one's write has completed, so every update reached every peer in two
// separate writes to the TCP socket, each a system call (on loopback, the receiver's side of the
// network stack runs in it too). With 240 edits a second on 20 boards of 6, those writes were
// the largest single cost of the server's event loop.
//
// For a connection on the WebSocket transport this keeps the transport writable while a write is
// under way (the ws library queues frames itself, in order, so nothing is reordered) and holds
// the TCP socket's writes until the end of the current tick (`cork`, released by
// `process.nextTick`): the frames of one message, and of every message sent to that connection
// in the same tick, leave in one write. engine.io's "sent" callbacks and drain events still come
// once per transport send, as before. Long-polling connections are left as they are.
import type { Server } from 'socket.io';

/** The parts of engine.io's WebSocket transport this relies on (engine.io 6.6). */
interface WsTransport {
	name: string;
	writable: boolean;
	send(packets: unknown[]): void;
	socket?: { _socket?: { cork(): void; uncork(): void; destroyed?: boolean } };
	[COALESCED]?: true;
}

const COALESCED = Symbol('spotface.coalescedWrites');

function coalesce(transport: WsTransport) {
	if (transport.name !== 'websocket' || transport[COALESCED]) return;
	const raw = transport.socket?._socket;
	if (!raw || typeof raw.cork !== 'function' || typeof transport.send !== 'function') return;
	transport[COALESCED] = true;
	const send = transport.send.bind(transport);
	let corked = false;
	transport.send = (packets: unknown[]) => {
		if (!corked && !raw.destroyed) {
			corked = true;
			raw.cork();
			process.nextTick(() => {
				corked = false;
				raw.uncork();
			});
		}
		send(packets);
		// ws queues whatever follows behind this write, in order: no need to wait for it.
		transport.writable = true;
	};
}

/** Applies the coalescing to every connection of `io` that is, or is upgraded to, WebSocket. */
export function coalesceWebSocketWrites(io: Server) {
	io.engine.on('connection', (conn: { transport: WsTransport; on(ev: 'upgrade', f: (t: WsTransport) => void): void }) => {
		coalesce(conn.transport);
		conn.on('upgrade', (t) => coalesce(t));
	});
}
