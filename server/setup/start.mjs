// npm start: set up everything on a fresh clone and serve the app.
import { spawn } from 'node:child_process';
import { log, prepare, runStep, spawnChild } from './common.mjs';

const host = process.env.HOST ?? '127.0.0.1';
const port = Number(process.env.PORT ?? 3000);
const pgPort = Number(process.env.SPOTFACE_PG_PORT ?? 54329);
const smtpPort = Number(process.env.SMTP_FAKE_PORT ?? 2525);

const cluster = prepare({ clusterDir: '.data/pg', port: pgPort, dbName: 'spotface', seed: true });
runStep('Building the app', 'npx', ['vite', 'build', '--logLevel', 'warn']);

const children = [];
const env = {
	DATABASE_URL: cluster.url,
	HOST: host,
	PORT: String(port),
	ORIGIN: process.env.ORIGIN ?? `http://${host === '0.0.0.0' ? '127.0.0.1' : host}:${port}`,
	DATA_DIR: process.env.DATA_DIR ?? '.data'
};
if (!process.env.SMTP_URL) {
	env.SMTP_URL = `smtp://127.0.0.1:${smtpPort}`;
	env.MAIL_CAPTURE_DIR = '.data/mail';
	// The developer's mail viewer (/dev/mail) shows every captured message, reset links included:
	// on only while the app listens on loopback alone (and it answers loopback clients only).
	env.DEV_MAIL_VIEWER = process.env.DEV_MAIL_VIEWER ?? (/^(127\.|localhost$|::1$)/.test(host) ? '1' : '0');
	children.push(spawnChild('node', ['--import', 'tsx', 'server/setup/mail-server.ts'], { ...env, SMTP_FAKE_PORT: String(smtpPort) }));
}
const app = spawn('node', ['--import', 'tsx', 'server/index.ts'], {
	stdio: ['inherit', 'pipe', 'inherit'],
	env: { ...process.env, ...env }
});
children.push(app);
let announced = false;
app.stdout.on('data', (chunk) => {
	process.stdout.write(chunk);
	if (!announced && String(chunk).includes('listening on')) {
		announced = true;
		banner();
	}
});

function banner() {
	log(`Spotface is at ${env.ORIGIN}`);
	log('Demo sign-ins (password for all: spotface-demo):');
	log('  admin@harrowgate.example     admin');
	log('  engineer@harrowgate.example  engineer');
	log('  tech@harrowgate.example      technician');
	log('  viewer@harrowgate.example    viewer');
	if (env.DEV_MAIL_VIEWER === '1') log(`E-mail goes to a local test mail server; read it on this machine at ${env.ORIGIN}/dev/mail`);
	else if (env.MAIL_CAPTURE_DIR) log(`E-mail goes to a local test mail server, kept in ${env.MAIL_CAPTURE_DIR} (mail viewer off: HOST is not loopback)`);
	log('Press Ctrl-C to stop the app and the database.');
}

let stopping = false;
function stop(code = 0) {
	if (stopping) return;
	stopping = true;
	log('Stopping…');
	for (const c of children) if (c.exitCode === null) c.kill('SIGTERM');
	setTimeout(() => {
		cluster.stop();
		log('Database stopped.');
		process.exit(code);
	}, 800);
}
process.on('SIGINT', () => stop(0));
process.on('SIGTERM', () => stop(0));
app.on('exit', (code) => {
	if (!stopping) {
		console.error(`The app exited (code ${code}).`);
		stop(code ?? 1);
	}
});
