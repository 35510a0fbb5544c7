import { existsSync, readFileSync } from 'node:fs';

/** The URL of the cluster that `npm start` made, for commands run by hand. */
export function localDatabaseUrl(): string {
	const pw = '.data/pg/password';
	if (!existsSync(pw)) throw new Error('DATABASE_URL is not set and no local cluster exists yet: run `npm start` once.');
	const port = process.env.PGPORT_APP ?? '54329';
	return `postgres://spotface:${encodeURIComponent(readFileSync(pw, 'utf8').trim())}@127.0.0.1:${port}/spotface`;
}
