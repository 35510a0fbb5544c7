// The server's layers: repositories (src/lib/server/db) read and write rows and know nothing of
// the live board; the live board builds on them, never the other way round.
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../../../src/lib/server');

function sourceFiles(dir: string): string[] {
	return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
		e.isDirectory() ? sourceFiles(join(dir, e.name)) : /\.(ts|js)$/.test(e.name) ? [join(dir, e.name)] : []
	);
}

/** Every module specifier a file imports or re-exports, static or dynamic. */
function specifiers(code: string): string[] {
	const out: string[] = [];
	const patterns = [
		/\b(?:import|export)\s[^'"]*?\bfrom\s*['"]([^'"]+)['"]/g,
		/\bimport\s*['"]([^'"]+)['"]/g,
		/\bimport\s*\(\s*['"]([^'"]+)['"]\s*\)/g
	];
	for (const re of patterns) for (const m of code.matchAll(re)) out.push(m[1]);
	return out;
}

/** Whether an import from `file` lands in src/lib/server/collab. */
function reachesCollab(file: string, spec: string): boolean {
	if (spec.startsWith('$lib/server/collab')) return true;
	if (!spec.startsWith('.')) return false;
	const target = resolve(dirname(file), spec);
	return target === join(root, 'collab') || target.startsWith(join(root, 'collab') + '/');
}

describe('repositories', () => {
	const files = sourceFiles(join(root, 'db'));

	it('are found', () => {
		expect(files.map((f) => f.slice(root.length + 1))).toContain('db/boards.ts');
	});

	it('import nothing from the live board (collab)', () => {
		const offending = files.flatMap((f) =>
			specifiers(readFileSync(f, 'utf8'))
				.filter((s) => reachesCollab(f, s))
				.map((s) => `${f.slice(root.length + 1)} → ${s}`)
		);
		expect(offending).toEqual([]);
	});

	it('the check sees such an import', () => {
		const file = join(root, 'db', 'boards.ts');
		expect(specifiers(`import { announceBoardChange } from '../collab/notify';`).filter((s) => reachesCollab(file, s))).toEqual([
			'../collab/notify'
		]);
		expect(specifiers(`export { compact } from "../collab/persistence";`).filter((s) => reachesCollab(file, s))).toHaveLength(1);
		expect(specifiers(`const m = await import('$lib/server/collab/notify');`).filter((s) => reachesCollab(file, s))).toHaveLength(1);
		expect(specifiers(`import { x } from './collab-like';`).filter((s) => reachesCollab(file, s))).toEqual([]);
	});
});
