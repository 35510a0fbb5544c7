// The reference for bench/sync.ts: the Yjs WebSocket server (@y/websocket-server's utils, in
// memory, no persistence) in a process of its own, so its CPU and memory are measured apart.
// Plain JavaScript run by node, like the app's own server/index.js. Prints "listening on PORT".
import http from 'node:http';
import { WebSocketServer } from 'ws';
import { setupWSConnection } from '@y/websocket-server/utils';

const server = http.createServer((_req, res) => {
	res.writeHead(200, { 'content-type': 'text/plain' });
	res.end('reference Yjs server');
});
const wss = new WebSocketServer({ noServer: true });
wss.on('connection', (ws, req) => setupWSConnection(ws, req, { gc: true }));
server.on('upgrade', (req, socket, head) => wss.handleUpgrade(req, socket, head, (ws) => wss.emit('connection', ws, req)));
server.listen(Number(process.env.PORT ?? 0), '127.0.0.1', () => {
	console.log(`listening on ${server.address().port}`);
});
process.on('SIGTERM', () => {
	wss.close();
	server.close(() => process.exit(0));
});
