import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readCapturedMail, startFakeSmtp, type CapturedMail } from '../../src/lib/server/mail/fake-smtp';

export async function startTestMail() {
	const dir = mkdtempSync(join(tmpdir(), 'spotface-mail-'));
	const smtp = await startFakeSmtp({ dir });
	return {
		dir,
		env: { SMTP_URL: smtp.url, MAIL_CAPTURE_DIR: dir },
		close: smtp.close,
		/** Wait for a message to `to` (optionally matching the subject) and return it. */
		async waitFor(to: string, subject?: RegExp, timeoutMs = 10_000): Promise<CapturedMail> {
			const end = Date.now() + timeoutMs;
			while (Date.now() < end) {
				const m = readCapturedMail(dir).find(
					(x) => x.to.map((t) => t.toLowerCase()).includes(to.toLowerCase()) && (!subject || subject.test(x.subject))
				);
				if (m) return m;
				await new Promise((r) => setTimeout(r, 100));
			}
			throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
		},
		linkIn(mail: CapturedMail, pathPrefix: string): string {
			const m = mail.text.match(new RegExp(`https?://\\S+${pathPrefix.replace(/\//g, '\\/')}\\S+`));
			if (!m) throw new Error(`no ${pathPrefix} link in mail: ${mail.text}`);
			return m[0];
		}
	};
}
