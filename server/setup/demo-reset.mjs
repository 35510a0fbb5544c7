// npm run demo:reset: drop the demo organisation's data and seed it again, against DATABASE_URL
// or the local cluster of `npm start` (started for the reset if it is not running, and stopped
// again afterwards; a running `npm start` keeps its cluster).
import { existsSync } from 'node:fs';
import { log, prepare, runStep } from './common.mjs';

if (process.env.DATABASE_URL) {
	runStep('Resetting the demo organisation', 'node', ['--import', 'tsx', 'server/setup/demo-reset.ts']);
} else {
	const wasRunning = existsSync('.data/pg/data/postmaster.pid');
	const pgPort = Number(process.env.SPOTFACE_PG_PORT ?? 54329);
	const cluster = prepare({ clusterDir: '.data/pg', port: pgPort, dbName: 'spotface', seed: false });
	try {
		runStep('Resetting the demo organisation', 'node', ['--import', 'tsx', 'server/setup/demo-reset.ts'], {
			DATABASE_URL: cluster.url
		});
	} finally {
		if (!wasRunning) {
			cluster.stop();
			log('Database stopped.');
		}
	}
}
