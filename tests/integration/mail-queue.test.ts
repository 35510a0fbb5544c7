// E-mail goes out through the durable queue: a message whose first sends fail (the mail server
// is down) stays in mail_outbox with the error and is delivered by a later retry once the server
// is back; the row records the attempts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { freePort, startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { hashPassword } from '../../src/lib/server/auth/password';
import { readCapturedMail, startFakeSmtp } from '../../src/lib/server/mail/fake-smtp';

let t: TestDatabase;
let app: RunningApp;
let smtpPort: number;
let smtp: Awaited<ReturnType<typeof startFakeSmtp>> | null = null;
const dir = mkdtempSync(join(tmpdir(), 'spotface-mailq-'));
const EMAIL = 'owner@rowan-water.test';

beforeAll(async () => {
	t = await createTestDatabase();
	smtpPort = await freePort(); // nothing listens here yet
	app = await startApp({
		databaseUrl: t.url,
		env: { SMTP_URL: `smtp://127.0.0.1:${smtpPort}`, MAIL_RETRY_DELAY_SEC: '1', MAIL_RETRY_LIMIT: '6', QUEUE_POLL_SECONDS: '0.5' }
	});
	const org = await t.db.insertInto('organisation').values({ name: 'Rowan Water' }).returning('id').executeTakeFirstOrThrow();
	await t.db
		.insertInto('app_user')
		.values({ id: 'u-rowan', email: EMAIL, name: 'Ro Wan', password_hash: await hashPassword('rowan pass 1') })
		.execute();
	await t.db.insertInto('member').values({ organisation_id: org.id, user_id: 'u-rowan', role: 'admin' }).execute();
});
afterAll(async () => {
	await app?.stop();
	await smtp?.close();
	await t?.drop();
});

const row = () => t.db.selectFrom('mail_outbox').selectAll().where('to_address', '=', EMAIL).executeTakeFirst();

describe('mail on the queue', () => {
	it('retries a failed send and delivers it once the mail server answers', async () => {
		expect((await new Client(app.url).form('/forgot-password', { email: EMAIL })).status).toBe(200);
		// The first attempt fails: the row stays queued with the error and its attempt counted.
		await expect.poll(async () => (await row())?.attempts ?? 0, { timeout: 15_000 }).toBeGreaterThanOrEqual(1);
		const failed = await row();
		expect(failed?.status).toMatch(/queued|sending/);
		expect(failed?.sent_at).toBeNull();
		await expect.poll(async () => (await row())?.error ?? '', { timeout: 15_000 }).toMatch(/ECONNREFUSED|connect/i);

		smtp = await startFakeSmtp({ dir, port: smtpPort });
		await expect.poll(async () => (await row())?.status, { timeout: 40_000, interval: 200 }).toBe('sent');
		const sent = await row();
		expect(sent!.attempts).toBeGreaterThanOrEqual(2);
		expect(sent!.sent_at).not.toBeNull();
		const mails = readCapturedMail(dir).filter((m) => m.to.includes(EMAIL));
		expect(mails).toHaveLength(1);
		expect(mails[0].subject).toMatch(/reset/i);
	});
});
