import { fail, redirect } from '@sveltejs/kit';
import { acceptInviteSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { AccountError, WrongPasswordError, acceptInvitation, findOpenInvitation } from '$lib/server/auth/accounts';
import { clientAddress } from '$lib/server/auth/client-address';
import { endSession, startSession } from '$lib/server/auth/session';
import { context } from '$lib/server/context';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ params }) => {
	const db = context().handle.db;
	const inv = await findOpenInvitation(db, params.token);
	if (!inv) return { invitation: null };
	const existing = await db
		.selectFrom('app_user')
		.select('id')
		.where((eb) => eb(eb.fn('lower', ['email']), '=', inv.email.toLowerCase()))
		.executeTakeFirst();
	return {
		invitation: { email: inv.email, role: inv.role, organisationName: inv.organisation_name, hasAccount: Boolean(existing) }
	};
};

export const actions: Actions = {
	default: async (event) => {
		const { request, params, cookies, locals } = event;
		const form = parseForm(await request.formData(), acceptInviteSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const { handle, throttle } = context();
		// Accepting with an existing account checks its password: the same slowdown as sign-in,
		// or whoever holds the link could guess that account's password here unthrottled.
		const inv = await findOpenInvitation(handle.db, params.token);
		const address = clientAddress(event);
		if (inv) {
			const gate = await throttle.beginSignIn(inv.email, address);
			if (!gate.ok) {
				event.setHeaders({ 'retry-after': String(gate.retryAfterSec) });
				return fail(429, {
					values: form.values,
					errors: { _: `Too many wrong passwords from here. Wait ${gate.retryAfterSec} seconds and try again.` } as FieldErrors
				});
			}
		}
		let who;
		try {
			who = await acceptInvitation(handle.db, params.token, form.data);
		} catch (e) {
			if (e instanceof WrongPasswordError && inv) await throttle.signInFailed(inv.email, address);
			if (e instanceof AccountError) return fail(e.status, { values: form.values, errors: { [e.field ?? '_']: e.message } as FieldErrors });
			throw e;
		}
		if (inv) await throttle.signInSucceeded(inv.email, address);
		if (locals.viewer) await endSession(cookies, locals.viewer.sessionId);
		await startSession(cookies, who.userId, who.organisationId);
		redirect(303, '/?joined=1');
	}
};
