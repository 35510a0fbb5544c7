// A benchmark's own PostgreSQL cluster (never the one npm start or npm test uses) with a fresh,
// migrated database, and the app built, so every benchmark starts from the same place.
import { existsSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { startCluster as startClusterJs } from '../server/setup/pg.mjs';
import { createDb } from '../src/lib/server/db/index';
import { migrateToLatest } from '../src/lib/server/db/migrate';

interface Cluster {
	url: string;
	psql(sql: string): string;
	stop(): void;
}

export interface BenchDatabase {
	cluster: Cluster;
	url: string;
	handle: ReturnType<typeof createDb>;
	close(): Promise<void>;
}

export async function openBenchDatabase(opts: {
	dir: string;
	defaultPort: number;
	name: string;
	poolSize?: number;
	/** Runs on the cluster before the database is made (settings). */
	prepare?: (cluster: Cluster) => void;
	build?: boolean;
}): Promise<BenchDatabase> {
	const startCluster = startClusterJs as unknown as (o: { dir: string; port: number; dbName: string; log: () => void }) => Cluster;
	const cluster = startCluster({
		dir: opts.dir,
		port: Number(process.env.SPOTFACE_BENCH_PG_PORT ?? opts.defaultPort),
		dbName: 'postgres',
		log: () => {}
	});
	opts.prepare?.(cluster);
	cluster.psql(`drop database if exists ${opts.name} with (force)`);
	cluster.psql(`create database ${opts.name}`);
	const url = cluster.url.replace(/\/postgres$/, `/${opts.name}`);
	const handle = createDb(url, opts.poolSize ?? 5);
	await migrateToLatest(handle.db);
	if (opts.build !== false && !existsSync('build/handler.js')) {
		const r = spawnSync('npx', ['vite', 'build', '--logLevel', 'error'], { stdio: 'inherit' });
		if (r.status !== 0) throw new Error('vite build failed');
	}
	return {
		cluster,
		url,
		handle,
		async close() {
			await handle.close();
			cluster.stop();
		}
	};
}
