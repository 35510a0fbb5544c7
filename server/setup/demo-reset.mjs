// npm run demo:reset: drop the demo organisation's data and seed it again, against DATABASE_URL
// or the local cluster of `npm start` (started for the reset if it is not running, and stopped
// again afterwards; a running `npm start` keeps its cluster).
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { log, prepare } from './common.mjs';

function reset(env) {
	log('Resetting the demo organisation');
	const r = spawnSync('node', ['--import', 'tsx', 'server/setup/demo-reset.ts'], { stdio: 'inherit', env: { ...process.env, ...env } });
	return r.status ?? 1;
}

if (process.env.DATABASE_URL) {
	process.exitCode = reset({});
} else {
	const wasRunning = existsSync('.data/pg/data/postmaster.pid');
	const pgPort = Number(process.env.SPOTFACE_PG_PORT ?? 54329);
	const cluster = prepare({ clusterDir: '.data/pg', port: pgPort, dbName: 'spotface', seed: false });
	process.exitCode = reset({ DATABASE_URL: cluster.url });
	if (!wasRunning) {
		cluster.stop();
		log('Database stopped.');
	}
}
