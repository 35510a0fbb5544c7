// A local stand-in for the outside system that receives webhooks, for tests and the demo: it
// records every delivery (headers and raw body) and can be told to fail the first N requests.
// With `dir`, deliveries are also kept as JSON files there (the demo's `npm start` does that).
import { createServer, type IncomingHttpHeaders } from 'node:http';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';

export interface ReceivedDelivery {
	at: number;
	path: string;
	headers: IncomingHttpHeaders;
	body: string;
	/** The status this receiver answered. */
	answered: number;
}

export async function startWebhookReceiver(opts: { port?: number; host?: string; failFirst?: number; dir?: string } = {}) {
	const received: ReceivedDelivery[] = [];
	let failuresLeft = opts.failFirst ?? 0;
	if (opts.dir) mkdirSync(opts.dir, { recursive: true, mode: 0o700 });
	const server = createServer((req, res) => {
		let body = '';
		req.setEncoding('utf8');
		req.on('data', (d: string) => {
			if (body.length < 5_000_000) body += d;
		});
		req.on('end', () => {
			const answered = req.method !== 'POST' ? 405 : failuresLeft > 0 ? 500 : 204;
			if (answered === 500) failuresLeft--;
			const entry: ReceivedDelivery = { at: Date.now(), path: req.url ?? '/', headers: req.headers, body, answered };
			received.push(entry);
			if (opts.dir) writeFileSync(join(opts.dir, `${Date.now()}-${randomUUID()}.json`), JSON.stringify(entry, null, 2), { mode: 0o600 });
			res.writeHead(answered, { 'content-type': 'text/plain' });
			res.end(answered === 500 ? 'receiver is failing on purpose' : '');
		});
	});
	const host = opts.host ?? '127.0.0.1';
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(opts.port ?? 0, host, () => resolve());
	});
	const a = server.address();
	const port = typeof a === 'object' && a ? a.port : 0;
	return {
		port,
		url: `http://${host}:${port}/hooks/spotface`,
		received,
		/** Make the next `n` requests fail with 500. */
		failNext(n: number) {
			failuresLeft = n;
		},
		async waitFor(count: number, timeoutMs = 30_000): Promise<ReceivedDelivery[]> {
			const end = Date.now() + timeoutMs;
			while (received.length < count) {
				if (Date.now() > end) throw new Error(`the receiver got ${received.length} of ${count} requests within ${timeoutMs} ms`);
				await new Promise((r) => setTimeout(r, 50));
			}
			return received;
		},
		close: () => new Promise<void>((resolve) => server.close(() => resolve()))
	};
}
