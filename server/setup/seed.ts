import { createDb } from '../../src/lib/server/db/index';
import { seedDemo } from '../../src/lib/server/db/seed';
import { localDatabaseUrl } from './local-db';
import { createStorage, storageConfigFromEnv } from '../../src/lib/server/storage/index';

const { db, close } = createDb(process.env.DATABASE_URL ?? localDatabaseUrl(), 2);
try {
	// Demo pictures go where the app reads media (DATA_DIR or S3, as configured).
	await seedDemo(db, [], { storage: createStorage(storageConfigFromEnv(process.env, process.env.DATA_DIR || '.data')) });
	console.log('Demo data is in place.');
} catch (e) {
	console.error('Seeding failed:', (e as Error).message);
	process.exitCode = 1;
} finally {
	await close();
}
