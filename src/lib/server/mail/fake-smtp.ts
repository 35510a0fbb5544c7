// A local SMTP server for development and tests: it accepts every message and keeps it as a
// JSON file in a folder, where the developer's mail viewer (/dev/mail, DEV_MAIL_VIEWER=1) and the
// tests read it. The folder holds every message, reset links included: it is private to its owner.
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import { chmodSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';

export interface CapturedMail {
	id: string;
	receivedAt: string;
	from: string;
	to: string[];
	subject: string;
	text: string;
}

export async function startFakeSmtp(opts: { dir: string; port?: number; host?: string }) {
	mkdirSync(opts.dir, { recursive: true, mode: 0o700 });
	chmodSync(opts.dir, 0o700); // also when it existed before
	const server = new SMTPServer({
		authOptional: true,
		disabledCommands: ['STARTTLS'],
		logger: false,
		size: 5 * 1024 * 1024,
		onData(stream, session, callback) {
			simpleParser(stream)
				.then((parsed) => {
					const mail: CapturedMail = {
						id: randomUUID(),
						receivedAt: new Date().toISOString(),
						from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
						to: session.envelope.rcptTo.map((r) => r.address),
						subject: parsed.subject ?? '',
						text: parsed.text ?? ''
					};
					writeFileSync(join(opts.dir, `${Date.now()}-${mail.id}.json`), JSON.stringify(mail, null, 2), { mode: 0o600 });
					callback();
				})
				.catch((err) => callback(err));
		}
	});
	const host = opts.host ?? '127.0.0.1';
	await new Promise<void>((resolve, reject) => {
		server.once('error', reject);
		server.listen(opts.port ?? 0, host, () => resolve());
	});
	server.on('error', (err) => console.error('[fake-smtp]', err.message));
	const address = server.server.address();
	const port = typeof address === 'object' && address ? address.port : 0;
	return {
		port,
		url: `smtp://${host}:${port}`,
		close: () => new Promise<void>((resolve) => server.close(() => resolve()))
	};
}

/** Newest first. */
export function readCapturedMail(dir: string): CapturedMail[] {
	let files: string[];
	try {
		files = readdirSync(dir).filter((f) => f.endsWith('.json'));
	} catch {
		return [];
	}
	return files
		.sort()
		.reverse()
		.map((f) => JSON.parse(readFileSync(join(dir, f), 'utf8')) as CapturedMail);
}
