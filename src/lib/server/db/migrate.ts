import { promises as fs } from 'node:fs';
import path from 'node:path';
import { FileMigrationProvider, Migrator, NO_MIGRATIONS, type Kysely, type MigrationResultSet } from 'kysely';

export function createMigrator(db: Kysely<any>, folder = path.resolve('migrations')) {
	return new Migrator({
		db,
		provider: new FileMigrationProvider({ fs, path, migrationFolder: folder })
	});
}

function check(r: MigrationResultSet): MigrationResultSet {
	if (r.error) throw r.error instanceof Error ? r.error : new Error(String(r.error));
	return r;
}

export async function migrateToLatest(db: Kysely<any>, folder?: string) {
	return check(await createMigrator(db, folder).migrateToLatest());
}

export async function migrateDown(db: Kysely<any>, folder?: string) {
	return check(await createMigrator(db, folder).migrateDown());
}

export async function migrateToEmpty(db: Kysely<any>, folder?: string) {
	return check(await createMigrator(db, folder).migrateTo(NO_MIGRATIONS));
}
