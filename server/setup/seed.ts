import { createDb } from '../../src/lib/server/db/index';
import { seedDemo } from '../../src/lib/server/db/seed';
import { localDatabaseUrl } from './local-db';

const { db, close } = createDb(process.env.DATABASE_URL ?? localDatabaseUrl(), 2);
try {
	await seedDemo(db);
	console.log('Demo data is in place.');
} catch (e) {
	console.error('Seeding failed:', (e as Error).message);
	process.exitCode = 1;
} finally {
	await close();
}
