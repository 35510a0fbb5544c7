// Starts the built app (server/index.js: SvelteKit handler + socket.io) as a child process on a
// free port, as production runs it.
import { spawn, type ChildProcess } from 'node:child_process';
import { createServer } from 'node:net';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export interface RunningApp {
	url: string;
	port: number;
	dataDir: string;
	output(): string;
	stop(): Promise<void>;
	process: ChildProcess;
}

export function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const s = createServer();
		s.once('error', reject);
		s.listen(0, '127.0.0.1', () => {
			const a = s.address();
			const port = typeof a === 'object' && a ? a.port : 0;
			s.close(() => resolve(port));
		});
	});
}

export async function startApp(opts: {
	databaseUrl: string;
	env?: Record<string, string>;
	port?: number;
	dataDir?: string;
	/** Extra node flags (benchmarks: --cpu-prof and the like, which NODE_OPTIONS does not take). */
	nodeArgs?: string[];
}): Promise<RunningApp> {
	const port = opts.port ?? (await freePort());
	const url = `http://127.0.0.1:${port}`;
	const dataDir = opts.dataDir ?? mkdtempSync(join(tmpdir(), 'spotface-data-'));
	const child = spawn('node', [...(opts.nodeArgs ?? []), 'server/index.js'], {
		env: {
			...process.env,
			NODE_ENV: 'production',
			HOST: '127.0.0.1',
			PORT: String(port),
			ORIGIN: url,
			DATABASE_URL: opts.databaseUrl,
			DATA_DIR: dataDir,
			...opts.env
		},
		stdio: ['ignore', 'pipe', 'pipe']
	});
	let out = '';
	child.stdout!.on('data', (d) => (out += d));
	child.stderr!.on('data', (d) => (out += d));
	await new Promise<void>((resolve, reject) => {
		const timer = setTimeout(() => reject(new Error(`app did not start in 30 s:\n${out}`)), 30_000);
		const check = () => {
			if (out.includes('listening on')) {
				clearTimeout(timer);
				resolve();
			}
		};
		child.stdout!.on('data', check);
		child.once('exit', (code) => {
			clearTimeout(timer);
			reject(new Error(`app exited with ${code}:\n${out}`));
		});
	});
	return {
		url,
		port,
		dataDir,
		process: child,
		output: () => out,
		stop: () =>
			new Promise<void>((resolve) => {
				if (child.exitCode !== null || child.signalCode !== null) return resolve();
				child.once('exit', () => resolve());
				child.kill('SIGTERM');
				setTimeout(() => child.kill('SIGKILL'), 5000).unref();
			})
	};
}
