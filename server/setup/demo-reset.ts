// npm run demo:reset: drops the demo organisation's data and seeds it again.
import { createDb } from '../../src/lib/server/db/index';
import { resetDemo } from '../../src/lib/server/db/seed';
import { localDatabaseUrl } from './local-db';
import { createStorage, storageConfigFromEnv } from '../../src/lib/server/storage/index';

const { db, close } = createDb(process.env.DATABASE_URL ?? localDatabaseUrl(), 2);
try {
	await resetDemo(db, [], { storage: createStorage(storageConfigFromEnv(process.env, process.env.DATA_DIR || '.data')) });
	console.log('The demo organisation has been seeded again.');
} catch (e) {
	console.error('Resetting the demo failed:', (e as Error).message);
	process.exitCode = 1;
} finally {
	await close();
}
