// Installs npm dependencies when they are missing or older than the lock file.
import { spawnSync } from 'node:child_process';
import { existsSync, statSync } from 'node:fs';

export function ensureDependencies(log = console.log) {
	const lock = existsSync('package-lock.json');
	const marker = 'node_modules/.package-lock.json';
	const stale = !existsSync(marker) || (lock && statSync('package-lock.json').mtimeMs > statSync(marker).mtimeMs + 1000);
	if (!stale) return;
	log(lock ? 'Installing npm dependencies (npm ci)…' : 'Installing npm dependencies…');
	const r = spawnSync('npm', [lock ? 'ci' : 'install', '--no-audit', '--no-fund'], { stdio: 'inherit' });
	if (r.status !== 0) throw new Error('npm install failed');
}

export function ensureChromium(log = console.log) {
	if (existsSync('/usr/bin/chromium')) return '/usr/bin/chromium';
	if (process.getuid?.() !== 0) throw new Error("Debian's chromium is missing: sudo apt-get install chromium");
	log("Installing Debian's chromium for browser tests…");
	const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
	for (const args of [
		['update', '-qq'],
		['install', '-y', '-qq', 'chromium']
	]) {
		const r = spawnSync('apt-get', args, { stdio: 'inherit', env });
		if (r.status !== 0) throw new Error(`apt-get ${args.join(' ')} failed`);
	}
	return '/usr/bin/chromium';
}
