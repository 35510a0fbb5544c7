// Backpressure for a connection over its byte budget: besides the answer "not now, send again in
// N ms", the server stops reading that connection's messages for those N ms. What the sender
// keeps sending then waits in its own TCP buffers (and the sender's socket blocks once they are
// full), instead of being read, decoded and answered "not now" one by one on the event loop that
// every other board shares. A client that waits as told never notices; a flood is slowed at the
// network. Only WebSocket connections are held (long polling has no reading to pause).
import type { Socket } from 'socket.io';

/**
 * The longest hold at once: engine.io's heartbeat answers (sent by the client every 25 s, due
 * within 20 s) wait behind a hold too, so it stays far below that.
 */
export const MAX_HOLD_MS = 3000;

interface PausableWebSocket {
	pause(): void;
	resume(): void;
	readonly isPaused: boolean;
}

function webSocketOf(socket: Socket): PausableWebSocket | null {
	const transport = (socket.conn as unknown as { transport?: { name?: string; socket?: Partial<PausableWebSocket> } }).transport;
	const ws = transport?.name === 'websocket' ? transport.socket : undefined;
	return ws && typeof ws.pause === 'function' && typeof ws.resume === 'function' ? (ws as PausableWebSocket) : null;
}

/** Stops reading `socket` for `ms` (at most MAX_HOLD_MS); false when it cannot be held. */
export function holdReading(socket: Socket, ms: number): boolean {
	const ws = webSocketOf(socket);
	if (!ws || !socket.connected) return false;
	if (ws.isPaused) return true;
	ws.pause();
	const timer = setTimeout(() => ws.resume(), Math.max(1, Math.min(ms, MAX_HOLD_MS)));
	timer.unref?.();
	return true;
}
