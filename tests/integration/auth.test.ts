import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { startTestMail } from '../helpers/mail';
import { Client } from '../helpers/http';
import { signUpAndConfirm, signUpLink } from '../helpers/accounts';

let t: TestDatabase;
let app: RunningApp;
let mail: Awaited<ReturnType<typeof startTestMail>>;

beforeAll(async () => {
	t = await createTestDatabase();
	mail = await startTestMail();
	app = await startApp({
		databaseUrl: t.url,
		env: { ...mail.env, RATE_LIMIT_SIGNIN_FREE_PER_ACCOUNT_ADDRESS: '5', RATE_LIMIT_SIGNUP_PER_ADDRESS: '100' }
	});
});
afterAll(async () => {
	await app?.stop();
	await mail?.close();
	await t?.drop();
});

async function signUp(c: Client, email: string, org = 'Northfield Pumping') {
	return signUpAndConfirm(c, t.db, { organisationName: org, name: 'Ada Admin', email, password: 'correct horse 42' });
}

describe('sign-up and sign-in', () => {
	it('sign-up mails a link; the link creates an organisation whose first member is admin, and signs in', async () => {
		const c = new Client(app.url);
		const fields = {
			organisationName: 'Northfield Pumping',
			name: 'Ada Admin',
			email: 'ada@northfield.test',
			password: 'correct horse 42'
		};
		const res = await c.form('/sign-up', fields);
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('Check your e-mail');
		expect(c.sessionCookie).toBeUndefined();
		expect(await t.db.selectFrom('app_user').select('id').where('email', '=', 'ada@northfield.test').executeTakeFirst()).toBeUndefined();

		const m = await mail.waitFor('ada@northfield.test', /Finish creating/);
		const link = new URL(mail.linkIn(m, '/sign-up/confirm/'));
		expect(link.pathname).toBe(await signUpLink(t.db, 'ada@northfield.test'));
		// Opening the link changes nothing (mail scanners fetch links); the button does.
		expect(await (await c.get(link.pathname)).text()).toContain('Create Northfield Pumping');
		expect(await t.db.selectFrom('app_user').select('id').where('email', '=', 'ada@northfield.test').executeTakeFirst()).toBeUndefined();
		const done = await c.form(link.pathname, {});
		expect(done.status).toBe(303);
		expect(done.headers.get('location')).toBe('/?welcome=1');
		expect(c.sessionCookie).toBeTruthy();
		const me = await (await c.json('GET', '/api/v1/members')).json();
		expect(me.items).toEqual([expect.objectContaining({ email: 'ada@northfield.test', role: 'admin' })]);
		const row = await t.db
			.selectFrom('app_user')
			.select('password_hash')
			.where('email', '=', 'ada@northfield.test')
			.executeTakeFirstOrThrow();
		expect(row.password_hash.startsWith('$argon2id$')).toBe(true);

		// Single use.
		const again = await new Client(app.url).form(link.pathname, {});
		expect(again.status).toBe(410);
	});

	it('sign-up with a taken e-mail answers as for a new one, creates nothing, and mails the owner', async () => {
		const c = new Client(app.url);
		const res = await c.form('/sign-up', {
			organisationName: 'Second Org',
			name: 'Someone Else',
			email: 'ada@northfield.test',
			password: 'another pass 42'
		});
		expect(res.status).toBe(200);
		const html = await res.text();
		expect(html).toContain('Check your e-mail');
		expect(html).not.toContain('data-field-error');
		expect(c.sessionCookie).toBeUndefined();
		const m = await mail.waitFor('ada@northfield.test', /tried to sign up/);
		expect(m.text).toContain('/forgot-password');
		expect(m.text).not.toMatch(/\/sign-up\/confirm\/|\/reset-password\//);
		expect(await t.db.selectFrom('organisation').select('id').where('name', '=', 'Second Org').executeTakeFirst()).toBeUndefined();
		expect(
			await t.db.selectFrom('sign_up_request').select('id').where('organisation_name', '=', 'Second Org').executeTakeFirst()
		).toBeUndefined();
	});

	it('a sign-up link for an address that has meanwhile got an account creates nothing', async () => {
		const c = new Client(app.url);
		await c.form('/sign-up', { organisationName: 'Race Org', name: 'Rae Race', email: 'race@northfield.test', password: 'race pass 123' });
		const first = await signUpLink(t.db, 'race@northfield.test');
		await c.form('/sign-up', {
			organisationName: 'Race Org Two',
			name: 'Rae Race',
			email: 'race@northfield.test',
			password: 'race pass 123'
		});
		const second = await signUpLink(t.db, 'race@northfield.test', first);
		expect(second).not.toBe(first);
		expect((await c.form(first, {})).status).toBe(303);
		const res = await new Client(app.url).form(second, {});
		expect(res.status).toBe(409);
		expect(await res.text()).toContain('already have an account');
		expect(await t.db.selectFrom('organisation').select('id').where('name', '=', 'Race Org Two').executeTakeFirst()).toBeUndefined();
	});

	it('the session cookie is HttpOnly and SameSite', async () => {
		const c = new Client(app.url);
		const res = await c.form('/sign-in', { email: 'ada@northfield.test', password: 'correct horse 42' });
		expect(res.status).toBe(303);
		const cookie = res.headers.getSetCookie().find((x) => x.startsWith('spotface_session='))!;
		expect(cookie).toMatch(/HttpOnly/i);
		expect(cookie).toMatch(/SameSite=Lax/i);
		expect(cookie).not.toMatch(/Secure/); // plain http on loopback; Secure is set behind TLS
	});

	it('a wrong password is refused with a message beside the field', async () => {
		const c = new Client(app.url);
		const res = await c.form('/sign-in', { email: 'ada@northfield.test', password: 'wrong password!' });
		expect(res.status).toBe(400);
		expect(await res.text()).toContain('Wrong e-mail or password.');
		expect(c.sessionCookie).toBeUndefined();
	});

	it('sign-out ends the session on the server', async () => {
		const c = new Client(app.url);
		await c.signIn('ada@northfield.test', 'correct horse 42');
		const sid = c.sessionCookie!;
		expect((await c.form('/sign-out', {})).status).toBe(303);
		const old = new Client(app.url);
		old.cookies.set('spotface_session', sid);
		expect((await old.json('GET', '/api/v1/members')).status).toBe(401);
		expect(await t.db.selectFrom('user_session').select('id').where('id', '=', sid).executeTakeFirst()).toBeUndefined();
	});

	it('an expired session is refused and a page sends you to sign-in', async () => {
		const c = new Client(app.url);
		await c.signIn('ada@northfield.test', 'correct horse 42');
		await t.db
			.updateTable('user_session')
			.set({ expires_at: new Date(Date.now() - 1000) })
			.where('id', '=', c.sessionCookie!)
			.execute();
		const res = await c.get('/');
		expect(res.status).toBe(303);
		expect(res.headers.get('location')).toContain('/sign-in');
	});

	it('a session in its second half is renewed (new expiry, cookie set again)', async () => {
		const c = new Client(app.url);
		await c.signIn('ada@northfield.test', 'correct horse 42');
		const soon = new Date(Date.now() + 5 * 24 * 3600 * 1000); // 5 of 30 days left
		await t.db.updateTable('user_session').set({ expires_at: soon }).where('id', '=', c.sessionCookie!).execute();
		const res = await c.get('/');
		expect(res.status).toBe(200);
		expect(res.headers.getSetCookie().some((x) => x.startsWith('spotface_session='))).toBe(true);
		const row = await t.db.selectFrom('user_session').select('expires_at').where('id', '=', c.sessionCookie!).executeTakeFirstOrThrow();
		expect(new Date(row.expires_at).getTime()).toBeGreaterThan(Date.now() + 29 * 24 * 3600 * 1000);
	});

	it('repeated wrong passwords from one address make that address wait, even with the right password', async () => {
		const email = 'limited@northfield.test';
		await signUp(new Client(app.url), email, 'Limited Org');
		const c = new Client(app.url);
		const statuses: number[] = [];
		for (let i = 0; i < 7; i++) statuses.push((await c.form('/sign-in', { email, password: 'not it at all' })).status);
		// Five free failures, then a delay: the sixth failure sets it, the seventh attempt waits.
		expect(statuses.slice(0, 6)).toEqual([400, 400, 400, 400, 400, 400]);
		expect(statuses[6]).toBe(429);
		const res = await c.form('/sign-in', { email, password: 'correct horse 42' });
		expect(res.status).toBe(429);
		expect(Number(res.headers.get('retry-after'))).toBeGreaterThan(0);
		expect(await res.text()).toContain('Too many failed sign-ins');
	});
});

describe('password reset', () => {
	it('a reset link works once, ends old sessions, and the new password signs in', async () => {
		const email = 'reset@northfield.test';
		await signUp(new Client(app.url), email, 'Reset Org');
		const other = new Client(app.url);
		await other.signIn(email, 'correct horse 42');

		const c = new Client(app.url);
		expect((await c.form('/forgot-password', { email })).status).toBe(200);
		const m = await mail.waitFor(email, /Reset/);
		const link = new URL(mail.linkIn(m, '/reset-password/'));

		const first = await c.form(link.pathname, { password: 'brand new pass 1', confirm: 'brand new pass 1' });
		expect(first.status).toBe(303);
		expect(first.headers.get('location')).toBe('/sign-in?reset=1');
		// The old session is gone.
		expect((await other.json('GET', '/api/v1/members')).status).toBe(401);

		const second = await c.form(link.pathname, { password: 'another pass 22', confirm: 'another pass 22' });
		expect(second.status).toBe(410);
		expect(await second.text()).toContain('expired or was already used');

		await new Client(app.url).signIn(email, 'brand new pass 1');
		expect((await new Client(app.url).form('/sign-in', { email, password: 'another pass 22' })).status).toBe(400);
	});

	it('an expired reset link is refused', async () => {
		const email = 'expired@northfield.test';
		await signUp(new Client(app.url), email, 'Expired Org');
		await new Client(app.url).form('/forgot-password', { email });
		const m = await mail.waitFor(email, /Reset/);
		const link = new URL(mail.linkIn(m, '/reset-password/'));
		await t.db
			.updateTable('password_reset')
			.set({ expires_at: new Date(Date.now() - 1) })
			.execute();
		const res = await new Client(app.url).form(link.pathname, { password: 'brand new pass 1', confirm: 'brand new pass 1' });
		expect(res.status).toBe(410);
	});

	it('asking for an unknown address answers the same; the address gets a note without any link', async () => {
		const res = await new Client(app.url).form('/forgot-password', { email: 'nobody@northfield.test' });
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('If an account exists for nobody@northfield.test');
		const m = await mail.waitFor('nobody@northfield.test');
		expect(m.text).toContain('no account uses it');
		expect(m.text).not.toContain('/reset-password/');
		expect(await t.db.selectFrom('password_reset').select('id').execute()).toHaveLength(2); // the two tests above
	});
});

describe('invitations', () => {
	it('an admin invites a technician; accepting creates the member with that role', async () => {
		const admin = new Client(app.url);
		await signUp(admin, 'boss@eastmill.test', 'Eastmill Fans');
		const res = await admin.json('POST', '/api/v1/invitations', { email: 'tech@eastmill.test', role: 'technician' });
		expect(res.status).toBe(201);
		const m = await mail.waitFor('tech@eastmill.test', /invited/);
		const link = new URL(mail.linkIn(m, '/invite/'));

		const tech = new Client(app.url);
		const page = await tech.get(link.pathname);
		expect(await page.text()).toContain('Eastmill Fans');
		const accept = await tech.form(link.pathname, { name: 'Tam Tech', password: 'tech password 1' });
		expect(accept.status).toBe(303);
		const list = await (await tech.json('GET', '/api/v1/members')).json();
		expect(list.items).toEqual(expect.arrayContaining([expect.objectContaining({ email: 'tech@eastmill.test', role: 'technician' })]));

		// Single use.
		const again = await new Client(app.url).form(link.pathname, { name: 'Someone', password: 'another pass 1' });
		expect(again.status).toBe(410);
	});
});
