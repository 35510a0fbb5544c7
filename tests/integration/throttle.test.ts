// Issue: ten wrong passwords from anyone locked the account for 15 minutes, even against the
// right password. Now failures count per account-and-address and per address, with delays that
// grow; the counters live in PostgreSQL. The app reads the client address from
// X-Forwarded-For here (ADDRESS_HEADER), as it does behind a proxy.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { hashPassword } from '../../src/lib/server/auth/password';

let t: TestDatabase;
let app: RunningApp;
const OWNER = 'owner@rowan-mill.test';
const PW = 'rowan pass 123';
const ENV = {
	ADDRESS_HEADER: 'x-forwarded-for',
	RATE_LIMIT_SIGNIN_FREE_PER_ACCOUNT_ADDRESS: '3',
	RATE_LIMIT_SIGNIN_FREE_PER_ADDRESS: '8',
	RATE_LIMIT_SIGNUP_PER_ADDRESS: '3',
	RATE_LIMIT_SIGNUP_PER_ACCOUNT: '2',
	RATE_LIMIT_RESET_PER_ACCOUNT: '2',
	RATE_LIMIT_RESET_PER_ADDRESS: '4',
	RATE_LIMIT_INVITE_PER_ORGANISATION: '3'
};

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url, env: ENV });
	const org = await t.db.insertInto('organisation').values({ name: 'Rowan Mill' }).returning('id').executeTakeFirstOrThrow();
	await t.db
		.insertInto('app_user')
		.values({ id: 'u-rowan', email: OWNER, name: 'Rowan Owner', password_hash: await hashPassword(PW) })
		.execute();
	await t.db.insertInto('member').values({ organisation_id: org.id, user_id: 'u-rowan', role: 'admin' }).execute();
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

function from(address: string) {
	const c = new Client(app.url);
	c.headers['x-forwarded-for'] = address;
	return c;
}
const signIn = (c: Client, email: string, password: string) => c.form('/sign-in', { email, password });
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('sign-in slowdown', () => {
	it("a stranger's wrong passwords from one address do not stop the owner from another", async () => {
		const stranger = from('203.0.113.10');
		const statuses: number[] = [];
		for (let i = 0; i < 5; i++) statuses.push((await signIn(stranger, OWNER, `guess number ${i}`)).status);
		expect(statuses).toEqual([400, 400, 400, 400, 429]);
		// From the stranger's address even the right password waits.
		expect((await signIn(stranger, OWNER, PW)).status).toBe(429);
		// The owner, elsewhere, signs in at once.
		expect((await signIn(from('198.51.100.20'), OWNER, PW)).status).toBe(303);
	});

	it('the delay doubles with each further failure', async () => {
		const stranger = from('203.0.113.11');
		for (let i = 0; i < 4; i++) await signIn(stranger, OWNER, `guess number ${i}`);
		const waits: number[] = [];
		for (let round = 0; round < 3; round++) {
			const refused = await signIn(stranger, OWNER, 'another guess');
			expect(refused.status).toBe(429);
			const wait = Number(refused.headers.get('retry-after'));
			waits.push(wait);
			await sleep(wait * 1000 + 150);
			expect((await signIn(stranger, OWNER, `late guess ${round}`)).status).toBe(400);
		}
		expect(waits).toEqual([1, 2, 4]);
	});

	it('wrong passwords for many accounts from one address slow that address only', async () => {
		const sprayer = from('203.0.113.12');
		for (let i = 0; i < 9; i++) expect((await signIn(sprayer, `someone${i}@rowan-mill.test`, 'spray pass 1')).status).toBe(400);
		expect((await signIn(sprayer, 'someone-else@rowan-mill.test', 'spray pass 1')).status).toBe(429);
		expect((await signIn(sprayer, OWNER, PW)).status).toBe(429);
		expect((await signIn(from('198.51.100.21'), OWNER, PW)).status).toBe(303);
	});

	it("the right password from a fresh address clears only that address's count for the account", async () => {
		const c = from('198.51.100.22');
		for (let i = 0; i < 3; i++) expect((await signIn(c, OWNER, `typo ${i}`)).status).toBe(400);
		expect((await signIn(c, OWNER, PW)).status).toBe(303);
		// Counting starts again: three more typos are free.
		for (let i = 0; i < 3; i++) expect((await signIn(from('198.51.100.22'), OWNER, `typo again ${i}`)).status).toBe(400);
	});

	it('accepting an invitation with an existing account is slowed down the same way', async () => {
		// Whoever holds an invitation link must not get an unthrottled password check.
		const org = await t.db.insertInto('organisation').values({ name: 'Elm Works' }).returning('id').executeTakeFirstOrThrow();
		const hash = await hashPassword('elm admin pass');
		await t.db
			.insertInto('app_user')
			.values([
				{ id: 'u-elm', email: 'admin@elm-works.test', name: 'Elm Admin', password_hash: hash },
				{ id: 'u-ash', email: 'ash@ash-yard.test', name: 'Ash Person', password_hash: await hashPassword('ash own pass 1') }
			])
			.execute();
		await t.db.insertInto('member').values({ organisation_id: org.id, user_id: 'u-elm', role: 'admin' }).execute();
		const elm = from('198.51.100.50');
		await elm.signIn('admin@elm-works.test', 'elm admin pass');
		expect((await elm.json('POST', '/api/v1/invitations', { email: 'ash@ash-yard.test', role: 'viewer' })).status).toBe(201);
		const row = await t.db
			.selectFrom('mail_outbox')
			.select('body_text')
			.where('to_address', '=', 'ash@ash-yard.test')
			.executeTakeFirstOrThrow();
		const path = new URL(row.body_text.match(/https?:\/\/\S+\/invite\/\S+/)![0]).pathname;

		const guesser = from('203.0.113.16');
		const statuses: number[] = [];
		for (let i = 0; i < 5; i++) statuses.push((await guesser.form(path, { password: `guess ${i} for ash` })).status);
		expect(statuses).toEqual([400, 400, 400, 400, 429]);
		expect((await guesser.form(path, { password: 'ash own pass 1' })).status).toBe(429);
		// The real person, elsewhere, accepts at once.
		expect((await from('198.51.100.51').form(path, { password: 'ash own pass 1' })).status).toBe(303);
	});

	it('counters survive a restart of the app', async () => {
		const stranger = from('203.0.113.13');
		for (let i = 0; i < 2; i++) expect((await signIn(stranger, OWNER, `before restart ${i}`)).status).toBe(400);
		for (let i = 0; i < 2; i++)
			expect((await from('203.0.113.14').form('/forgot-password', { email: 'restart@rowan-mill.test' })).status).toBe(200);

		await app.stop();
		app = await startApp({ databaseUrl: t.url, env: ENV });

		const again = from('203.0.113.13');
		// Two more failures make four: past the three free ones, so the next attempt waits.
		for (let i = 0; i < 2; i++) expect((await signIn(again, OWNER, `after restart ${i}`)).status).toBe(400);
		expect((await signIn(again, OWNER, PW)).status).toBe(429);
		// The reset count for that address carried over too (limit 2 per account).
		expect((await from('203.0.113.15').form('/forgot-password', { email: 'restart@rowan-mill.test' })).status).toBe(429);
		const stored = await t.db.selectFrom('rate_limit').select('key').execute();
		expect(stored.length).toBeGreaterThan(0);
		expect(stored.some((r) => r.key.includes('restart@'))).toBe(false); // no addresses in clear
	});
});

describe('requests that send mail are limited', () => {
	it('sign-up: per client address and per e-mail address', async () => {
		const c = from('203.0.113.20');
		for (let i = 0; i < 3; i++) {
			const res = await c.form('/sign-up', {
				organisationName: 'Flood Org',
				name: 'Flo Od',
				email: `flood${i}@rowan-mill.test`,
				password: 'flood pass 123'
			});
			expect(res.status).toBe(200);
		}
		const over = await c.form('/sign-up', {
			organisationName: 'Flood Org',
			name: 'Flo Od',
			email: 'flood9@rowan-mill.test',
			password: 'flood pass 123'
		});
		expect(over.status).toBe(429);
		expect(await over.text()).toContain('Too many sign-ups');
		expect(
			(
				await from('203.0.113.21').form('/sign-up', {
					organisationName: 'Calm Org',
					name: 'Cal M',
					email: 'calm@rowan-mill.test',
					password: 'calm pass 1234'
				})
			).status
		).toBe(200);

		// One mailbox cannot be flooded from many addresses either.
		const target = { organisationName: 'Target Org', name: 'Tar Get', email: 'target@rowan-mill.test', password: 'target pass 1' };
		expect((await from('203.0.113.22').form('/sign-up', target)).status).toBe(200);
		expect((await from('203.0.113.23').form('/sign-up', target)).status).toBe(200);
		expect((await from('203.0.113.24').form('/sign-up', target)).status).toBe(429);
	});

	it('password reset: per client address and per e-mail address', async () => {
		const c = from('203.0.113.30');
		for (let i = 0; i < 4; i++) expect((await c.form('/forgot-password', { email: `who${i}@rowan-mill.test` })).status).toBe(200);
		expect((await c.form('/forgot-password', { email: 'who9@rowan-mill.test' })).status).toBe(429);
		expect((await from('203.0.113.31').form('/forgot-password', { email: OWNER })).status).toBe(200);
		expect((await from('203.0.113.32').form('/forgot-password', { email: OWNER })).status).toBe(200);
		const over = await from('203.0.113.33').form('/forgot-password', { email: OWNER });
		expect(over.status).toBe(429);
		expect(await over.text()).toContain('Too many reset requests');
		// Two reset mails were queued for the owner, not three.
		const resetRows = () =>
			t.db.selectFrom('mail_outbox').select('id').where('to_address', '=', OWNER).where('purpose', '=', 'password-reset').execute();
		await expect.poll(async () => (await resetRows()).length).toBe(2);
		await new Promise((r) => setTimeout(r, 300));
		expect(await resetRows()).toHaveLength(2);
	});

	it('invitations: per organisation, in the API and the form', async () => {
		const admin = from('198.51.100.40');
		await admin.signIn(OWNER, PW);
		for (let i = 0; i < 3; i++)
			expect((await admin.json('POST', '/api/v1/invitations', { email: `crew${i}@rowan-mill.test`, role: 'viewer' })).status).toBe(201);
		const over = await admin.json('POST', '/api/v1/invitations', { email: 'crew9@rowan-mill.test', role: 'viewer' });
		expect(over.status).toBe(429);
		expect(over.headers.get('content-type')).toContain('application/problem+json');
		expect(Number(over.headers.get('retry-after'))).toBeGreaterThan(0);
		expect((await over.json()).detail).toContain('Too many invitations');
		const form = await admin.form('/settings/members?/invite', { email: 'crew10@rowan-mill.test', role: 'viewer' });
		expect(form.status).toBe(429);
		expect(
			await t.db.selectFrom('invitation').select('id').where('email', 'in', ['crew9@rowan-mill.test', 'crew10@rowan-mill.test']).execute()
		).toEqual([]);
	});
});
