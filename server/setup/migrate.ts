// npm run db:migrate [up|down|latest|empty]. DATABASE_URL must be set (npm start prints it).
import { createDb } from '../../src/lib/server/db/index';
import { migrateDown, migrateToEmpty, migrateToLatest } from '../../src/lib/server/db/migrate';
import { localDatabaseUrl } from './local-db';

const cmd = process.argv[2] ?? 'latest';
const url = process.env.DATABASE_URL ?? localDatabaseUrl();
const { db, close } = createDb(url, 2);
try {
	const r = cmd === 'down' ? await migrateDown(db) : cmd === 'empty' ? await migrateToEmpty(db) : await migrateToLatest(db);
	for (const m of r.results ?? []) console.log(`${m.direction} ${m.migrationName}: ${m.status}`);
	if (!r.results?.length) console.log('Nothing to migrate.');
} catch (e) {
	console.error('Migration failed:', (e as Error).message);
	process.exitCode = 1;
} finally {
	await close();
}
