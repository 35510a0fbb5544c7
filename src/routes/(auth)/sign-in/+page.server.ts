import { fail, redirect } from '@sveltejs/kit';
import { signInSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { checkCredentials } from '$lib/server/auth/accounts';
import { clientAddress } from '$lib/server/auth/client-address';
import { startSession } from '$lib/server/auth/session';
import { context } from '$lib/server/context';
import { sameOriginPath } from '$lib/server/http/same-origin';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = ({ locals, url }) => {
	if (locals.viewer) redirect(303, sameOriginPath(url.searchParams.get('next'), context().config.origin));
	return { signedOut: url.searchParams.has('signed-out'), reset: url.searchParams.has('reset') };
};

function waitText(sec: number) {
	return sec < 90 ? `${sec} second${sec === 1 ? '' : 's'}` : `${Math.ceil(sec / 60)} minutes`;
}

export const actions: Actions = {
	default: async (event) => {
		const { request, cookies, url } = event;
		const form = parseForm(await request.formData(), signInSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const { throttle, handle, config } = context();
		const address = clientAddress(event);
		const email = form.data.email;
		// Too many failures of this account from this address, or of any account from this
		// address, make the next attempt wait; nobody else is slowed down.
		const gate = await throttle.beginSignIn(email, address);
		if (!gate.ok) {
			event.setHeaders({ 'retry-after': String(gate.retryAfterSec) });
			return fail(429, {
				values: form.values,
				errors: { _: `Too many failed sign-ins from here. Wait ${waitText(gate.retryAfterSec)} and try again.` } as FieldErrors
			});
		}
		const who = await checkCredentials(handle.db, email, form.data.password);
		if (!who) {
			await throttle.signInFailed(email, address);
			return fail(400, { values: form.values, errors: { password: 'Wrong e-mail or password.' } as FieldErrors });
		}
		await throttle.signInSucceeded(email, address);
		await startSession(cookies, who.userId, who.organisationId);
		redirect(303, sameOriginPath(url.searchParams.get('next'), config.origin));
	}
};
