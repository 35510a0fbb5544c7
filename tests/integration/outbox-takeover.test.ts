// Issue: an admin of organisation B invited admin@<A's domain>, asked for a password reset for that
// address, read the reset link in B's /settings/outbox, reset the password and signed in as A's
// admin. Every step after the invitation must now fail.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { startTestMail } from '../helpers/mail';
import { Client } from '../helpers/http';
import { hashPassword } from '../../src/lib/server/auth/password';

let t: TestDatabase;
let app: RunningApp;
let mail: Awaited<ReturnType<typeof startTestMail>>;
const PW = 'original pass 1';
const VICTIM = 'admin@alder-pumps.test';

async function makeOrg(name: string, adminEmail: string) {
	const org = await t.db.insertInto('organisation').values({ name }).returning('id').executeTakeFirstOrThrow();
	const id = `u-${name.toLowerCase().replace(/\W/g, '')}`;
	await t.db
		.insertInto('app_user')
		.values({ id, email: adminEmail, name: `${name} Admin`, password_hash: await hashPassword(PW) })
		.execute();
	await t.db.insertInto('member').values({ organisation_id: org.id, user_id: id, role: 'admin' }).execute();
	return org.id;
}

// Every page and GET endpoint an admin of B can open: none may carry a reset link.
const B_READS = [
	'/settings/outbox',
	'/settings/members',
	'/settings/organisation',
	'/',
	'/dev/mail',
	'/api/v1/invitations',
	'/api/v1/members',
	'/api/v1/organisation'
];

beforeAll(async () => {
	t = await createTestDatabase();
	mail = await startTestMail();
	app = await startApp({ databaseUrl: t.url, env: mail.env }); // DEV_MAIL_VIEWER unset: the viewer is off
	await makeOrg('Alder Pumps', VICTIM);
	await makeOrg('Birch Fans', 'admin@birch-fans.test');
});
afterAll(async () => {
	await app?.stop();
	await mail?.close();
	await t?.drop();
});

describe('account takeover through the outbox', () => {
	it("B invites A's admin and asks for a reset: B never sees the link and cannot take the account", async () => {
		const b = new Client(app.url);
		await b.signIn('admin@birch-fans.test', PW);

		// Step 1, allowed: B invites the address. The invitation is B's own mail.
		expect((await b.json('POST', '/api/v1/invitations', { email: VICTIM, role: 'viewer' })).status).toBe(201);
		await mail.waitFor(VICTIM, /invited/);

		// Step 2: B asks for a reset of that address (signed in, and signed out).
		expect((await b.form('/forgot-password', { email: VICTIM })).status).toBe(200);
		expect((await new Client(app.url).form('/forgot-password', { email: VICTIM })).status).toBe(200);
		// The reset mail went to the mailbox owner.
		const resetMail = await mail.waitFor(VICTIM, /Reset/);
		const resetLink = mail.linkIn(resetMail, '/reset-password/');
		const token = resetLink.split('/reset-password/')[1];
		const resets = async () =>
			(
				await t.db.selectFrom('mail_outbox').select(['purpose', 'audience', 'organisation_id']).where('to_address', '=', VICTIM).execute()
			).filter((r) => r.purpose === 'password-reset');
		await expect.poll(async () => (await resets()).length).toBe(2);
		expect(await resets()).toEqual([
			{ purpose: 'password-reset', audience: 'recipient', organisation_id: null },
			{ purpose: 'password-reset', audience: 'recipient', organisation_id: null }
		]);

		// Step 3: nothing B can open shows the link or its token.
		const outbox = await (await b.get('/settings/outbox')).text();
		expect(outbox).toContain('You are invited to Birch Fans'); // B's own invitation is listed…
		expect(outbox).toContain(VICTIM);
		expect(outbox).not.toContain('/invite/'); // …without its link (the recipient's alone)…
		expect(outbox).not.toContain('Reset your Spotface password'); // …and the reset not at all
		for (const path of B_READS) {
			for (const accept of ['text/html', 'application/json']) {
				const res = await b.get(path, { accept });
				const body = await res.text();
				expect(body, `${path} (${accept})`).not.toContain(token);
				expect(body, `${path} (${accept})`).not.toContain('/reset-password/');
			}
		}
		expect((await b.get('/dev/mail')).status).toBe(404);

		// Step 4: without the link B cannot reset; a made-up token is refused.
		const guess = await b.form('/reset-password/' + 'A'.repeat(43), { password: 'taken over 123', confirm: 'taken over 123' });
		expect(guess.status).toBe(410);

		// Step 5: B cannot sign in as A's admin; A's admin still can, with the old password.
		expect((await new Client(app.url).form('/sign-in', { email: VICTIM, password: 'taken over 123' })).status).toBe(400);
		const a = new Client(app.url);
		await a.signIn(VICTIM, PW);
		const members = await (await a.json('GET', '/api/v1/members')).json();
		expect(members.items.map((m: { email: string }) => m.email)).toEqual([VICTIM]);
	});

	it("A's outbox does not list the invitation B sent to A's address", async () => {
		const a = new Client(app.url);
		await a.signIn(VICTIM, PW);
		const html = await (await a.get('/settings/outbox')).text();
		expect(html).not.toContain('Birch Fans');
		expect(html).not.toContain('/invite/');
		expect(html).not.toContain('/reset-password/');
	});
});

describe('the developer mail viewer', () => {
	it('is off unless DEV_MAIL_VIEWER=1, and then answers only this machine', async () => {
		const dev = await startApp({ databaseUrl: t.url, env: { ...mail.env, DEV_MAIL_VIEWER: '1', ADDRESS_HEADER: 'x-forwarded-for' } });
		try {
			const local = new Client(dev.url);
			local.headers['x-forwarded-for'] = '127.0.0.1';
			const res = await local.get('/dev/mail');
			expect(res.status).toBe(200);
			expect(await res.text()).toContain('/reset-password/');

			const remote = new Client(dev.url);
			remote.headers['x-forwarded-for'] = '198.51.100.7';
			expect((await remote.get('/dev/mail')).status).toBe(404);
		} finally {
			await dev.stop();
		}
	});
});
