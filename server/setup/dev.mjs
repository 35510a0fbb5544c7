// npm run dev: the Vite dev server (with socket.io attached) against the same database as npm start.
import { prepare, spawnChild, log } from './common.mjs';

const pgPort = Number(process.env.SPOTFACE_PG_PORT ?? 54329);
const cluster = prepare({ clusterDir: '.data/pg', port: pgPort, dbName: 'spotface', seed: true });
const env = {
	DATABASE_URL: cluster.url,
	SPOTFACE_DEV: '1',
	ORIGIN: 'http://127.0.0.1:5173',
	SMTP_URL: process.env.SMTP_URL ?? 'smtp://127.0.0.1:2526',
	MAIL_CAPTURE_DIR: process.env.SMTP_URL ? '' : '.data/mail',
	// The Vite server listens on 127.0.0.1 only: the developer's mail viewer (/dev/mail) is safe here.
	DEV_MAIL_VIEWER: process.env.DEV_MAIL_VIEWER ?? (process.env.SMTP_URL ? '0' : '1')
};
const kids = [];
if (!process.env.SMTP_URL)
	kids.push(spawnChild('node', ['--import', 'tsx', 'server/setup/mail-server.ts'], { ...env, SMTP_FAKE_PORT: '2526' }));
const vite = spawnChild('npx', ['vite', 'dev', '--host', '127.0.0.1', '--port', '5173', '--strictPort'], env);
kids.push(vite);
const stop = () => {
	for (const k of kids) if (k.exitCode === null) k.kill('SIGTERM');
	setTimeout(() => {
		cluster.stop();
		log('Database stopped.');
		process.exit(0);
	}, 800);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
vite.on('exit', stop);
