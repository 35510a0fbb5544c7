// Issue: /sign-in?next=/\evil.example and next=/<TAB>/evil.example landed on http://evil.example/.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { BYPASSES } from '../helpers/redirects';
import { hashPassword } from '../../src/lib/server/auth/password';

let t: TestDatabase;
let app: RunningApp;
const EMAIL = 'redirect@hazel.test';
const PW = 'hazel pass 123';

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	const org = await t.db.insertInto('organisation').values({ name: 'Hazel Works' }).returning('id').executeTakeFirstOrThrow();
	await t.db
		.insertInto('app_user')
		.values({ id: 'u-hazel', email: EMAIL, name: 'Hazel Admin', password_hash: await hashPassword(PW) })
		.execute();
	await t.db.insertInto('member').values({ organisation_id: org.id, user_id: 'u-hazel', role: 'admin' }).execute();
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

/** Where a browser would go from this response: the Location resolved against the page's URL. */
function destination(res: Response, from: string): URL {
	const loc = res.headers.get('location');
	if (!loc) throw new Error(`no Location (status ${res.status})`);
	return new URL(loc, app.url + from);
}

describe('sign-in redirects only to our own origin', () => {
	it.each(BYPASSES.map((b) => [JSON.stringify(b), b]))('signing in with next=%s lands on /', async (_, next) => {
		const from = `/sign-in?next=${encodeURIComponent(next)}`;
		const c = new Client(app.url);
		const res = await c.form(from, { email: EMAIL, password: PW });
		expect(res.status).toBe(303);
		const to = destination(res, from);
		expect(to.origin).toBe(app.url);
		expect(to.pathname).toBe('/');
		expect(res.headers.get('location')).toBe('/');

		// Already signed in: opening the sign-in page redirects the same way.
		const again = await c.get(from);
		expect(again.status).toBe(303);
		expect(again.headers.get('location')).toBe('/');
	});

	it('raw, unencoded spellings in the query are refused too', async () => {
		const c = new Client(app.url);
		await c.signIn(EMAIL, PW);
		for (const raw of ['/\\evil.example', '/%09/evil.example', '//evil.example', 'https://evil.example', '/%5Cevil.example']) {
			const from = `/sign-in?next=${raw}`;
			const res = await c.get(from);
			expect(res.status, raw).toBe(303);
			expect(destination(res, from).origin, raw).toBe(app.url);
			expect(res.headers.get('location'), raw).toBe('/');
		}
	});

	it('a same-origin next still works, with its query', async () => {
		const from = `/sign-in?next=${encodeURIComponent('/register/machines?q=pump')}`;
		const res = await new Client(app.url).form(from, { email: EMAIL, password: PW });
		expect(res.status).toBe(303);
		expect(res.headers.get('location')).toBe('/register/machines?q=pump');
	});

	it('a page behind sign-in sends you to sign-in with a next that leads back', async () => {
		const c = new Client(app.url);
		const res = await c.get('/surveys?x=1');
		expect(res.status).toBe(303);
		const signIn = res.headers.get('location')!;
		const back = await c.form(signIn, { email: EMAIL, password: PW });
		expect(back.headers.get('location')).toBe('/surveys?x=1');
	});
});
