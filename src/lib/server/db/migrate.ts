import { readdir } from 'node:fs/promises';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { Migrator, NO_MIGRATIONS, type Kysely, type Migration, type MigrationProvider, type MigrationResultSet } from 'kysely';

/**
 * Reads migrations/<timestamp>_<name>.ts. The import happens here (not inside kysely) so that
 * whichever loader runs this module (tsx, vitest) also loads the TypeScript migrations.
 */
class FolderProvider implements MigrationProvider {
	constructor(private folder: string) {}
	async getMigrations(): Promise<Record<string, Migration>> {
		const out: Record<string, Migration> = {};
		const files = (await readdir(this.folder)).filter((f) => /^\d+_.+\.(ts|js|mjs)$/.test(f) && !f.endsWith('.d.ts')).sort();
		for (const f of files) {
			const mod = await import(/* @vite-ignore */ pathToFileURL(path.join(this.folder, f)).href);
			out[f.replace(/\.(ts|js|mjs)$/, '')] = mod;
		}
		return out;
	}
}

export function createMigrator<DB>(db: Kysely<DB>, folder = path.resolve('migrations')) {
	return new Migrator({ db, provider: new FolderProvider(folder) });
}

function check(r: MigrationResultSet): MigrationResultSet {
	if (r.error) throw r.error instanceof Error ? r.error : new Error(String(r.error));
	return r;
}

export async function migrateToLatest<DB>(db: Kysely<DB>, folder?: string) {
	return check(await createMigrator(db, folder).migrateToLatest());
}

export async function migrateDown<DB>(db: Kysely<DB>, folder?: string) {
	return check(await createMigrator(db, folder).migrateDown());
}

export async function migrateToEmpty<DB>(db: Kysely<DB>, folder?: string) {
	return check(await createMigrator(db, folder).migrateTo(NO_MIGRATIONS));
}
