// Sign-up finishes through a link mailed to the address. Tests read that link from the
// mail_outbox row (works with or without a mail server) and open it as the owner would.
import type { DB } from '../../src/lib/server/db';
import { Client } from './http';

/** The newest sign-up link mailed to `email` (other than `not`, to wait for a newer one). */
export async function signUpLink(db: DB, email: string, not?: string, timeoutMs = 10_000): Promise<string> {
	const end = Date.now() + timeoutMs;
	while (Date.now() < end) {
		const row = await db
			.selectFrom('mail_outbox')
			.select('body_text')
			.where('to_address', '=', email)
			.where('purpose', '=', 'sign-up')
			.orderBy('created_at', 'desc')
			.executeTakeFirst();
		const m = row?.body_text.match(/https?:\/\/\S+\/sign-up\/confirm\/\S+/);
		if (m && new URL(m[0]).pathname !== not) return new URL(m[0]).pathname;
		await new Promise((r) => setTimeout(r, 50));
	}
	throw new Error(`no sign-up link for ${email} within ${timeoutMs} ms`);
}

/** Sign up and confirm; `c` ends up signed in as the new organisation's admin. */
export async function signUpAndConfirm(
	c: Client,
	db: DB,
	fields: { organisationName: string; name: string; email: string; password: string }
): Promise<Response> {
	const res = await c.form('/sign-up', fields);
	if (res.status !== 200) throw new Error(`sign-up for ${fields.email} answered ${res.status}`);
	const path = await signUpLink(db, fields.email);
	const done = await c.form(path, {});
	if (done.status !== 303) throw new Error(`confirming the sign-up of ${fields.email} answered ${done.status}`);
	return done;
}
