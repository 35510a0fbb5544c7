// Shared steps of npm start, npm run dev and npm test. Node built-ins only.
import { spawn, spawnSync } from 'node:child_process';
import { resolve } from 'node:path';
import { ensureDependencies } from './deps.mjs';
import { startCluster } from './pg.mjs';

export const log = (s) => console.log(`\x1b[36m[spotface]\x1b[0m ${s}`);

export function runStep(label, cmd, args, env = {}) {
	log(label);
	const r = spawnSync(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env } });
	if (r.status !== 0) {
		console.error(`\n${label} failed (exit ${r.status}).`);
		process.exit(r.status || 1);
	}
}

/** Dependencies, cluster, database, migrations. Returns the cluster handle. */
export function prepare({ clusterDir, port, dbName, seed }) {
	ensureDependencies(log);
	const cluster = startCluster({ dir: clusterDir, port, dbName, log });
	const env = { DATABASE_URL: cluster.url };
	runStep('Running migrations', 'node', ['--import', 'tsx', 'server/setup/migrate.ts', 'latest'], env);
	if (seed) runStep('Seeding demo data', 'node', ['--import', 'tsx', 'server/setup/seed.ts'], env);
	return cluster;
}

export function spawnChild(cmd, args, env) {
	return spawn(cmd, args, { stdio: 'inherit', env: { ...process.env, ...env } });
}

export const root = resolve('.');
