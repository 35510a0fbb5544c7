import { fail, redirect } from '@sveltejs/kit';
import { signUpSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { requestSignUp } from '$lib/server/auth/accounts';
import { clientAddress } from '$lib/server/auth/client-address';
import { context } from '$lib/server/context';
import { afterResponse } from '$lib/server/after-response';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = ({ locals }) => {
	if (locals.viewer) redirect(303, '/');
};

export const actions: Actions = {
	// The same answer for a new and a known address: "check your e-mail". The link in the mail
	// creates the organisation; the owner of a known address is told so by mail instead.
	default: async (event) => {
		const form = parseForm(await event.request.formData(), signUpSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const { throttle, handle, mailer, config } = context();
		const limit = await throttle.request('signUp', { address: clientAddress(event), account: form.data.email });
		if (!limit.ok) {
			event.setHeaders({ 'retry-after': String(limit.retryAfterSec) });
			return fail(429, { values: form.values, errors: { _: 'Too many sign-ups from here. Wait a while and try again.' } as FieldErrors });
		}
		// Answer before looking the address up: a new and a known address get the same page at
		// the same speed; the mail tells them apart, and only the mailbox owner reads it.
		const input = form.data;
		afterResponse('sign-up', () => requestSignUp(handle.db, mailer, config.origin, input));
		return { sent: true, email: form.data.email };
	}
};
