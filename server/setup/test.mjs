// npm test: the same set-up as npm start for a separate test cluster, then every test
// (unit, integration against PostgreSQL, browser in Debian's Chromium). Non-zero exit on failure.
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { ensureChromium, ensureDependencies } from './deps.mjs';
import { startCluster } from './pg.mjs';
import { log } from './common.mjs';

/** Like runStep, but throws so the finally block below still stops the test cluster. */
function step(label, cmd, args) {
	log(label);
	const r = spawnSync(cmd, args, { stdio: 'inherit' });
	if (r.status !== 0) throw new Error(`${label} failed (exit ${r.status})`);
}

ensureDependencies(log);
ensureChromium(log);
const cluster = startCluster({
	dir: '.data/pg-test',
	port: Number(process.env.SPOTFACE_TEST_PG_PORT ?? 54339),
	dbName: 'spotface_test',
	log
});
let code = 1;
try {
	step('Linting (Prettier)', 'npx', ['prettier', '--check', '.']);
	step('Linting (ESLint)', 'npx', ['eslint', '.']);
	step('Building the app', 'npx', ['vite', 'build', '--logLevel', 'error']);
	step('Type-checking (svelte-check)', 'npx', [
		'svelte-check',
		'--tsconfig',
		'./tsconfig.json',
		'--threshold',
		'error',
		'--output',
		'human'
	]);
	log('Running every test: unit, integration, browser');
	const report = '.data/test-report.json';
	rmSync(report, { force: true });
	const r = spawnSync(
		'npx',
		['vitest', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${report}`, ...process.argv.slice(2)],
		{ stdio: 'inherit', env: { ...process.env, SPOTFACE_TEST_PG_URL: cluster.url, CHROMIUM_PATH: '/usr/bin/chromium' } }
	);
	code = r.status ?? 1;
	if (existsSync(report)) {
		const j = JSON.parse(readFileSync(report, 'utf8'));
		if (!j.numTotalTests) code = code || 1; // a run that executed no test is a failure
		console.log(`\n${j.numPassedTests} passed, ${j.numFailedTests} failed`);
	}
} catch (e) {
	console.error(`\n${e.message}`);
	code = 1;
} finally {
	cluster.stop();
}
log(code === 0 ? 'All tests passed.' : `Tests failed (exit ${code}).`);
process.exit(code);
