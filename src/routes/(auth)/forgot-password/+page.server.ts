import { fail } from '@sveltejs/kit';
import { forgotSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { requestPasswordReset } from '$lib/server/auth/accounts';
import { clientAddress } from '$lib/server/auth/client-address';
import { context } from '$lib/server/context';
import { afterResponse } from '$lib/server/after-response';
import type { Actions } from './$types';

export const actions: Actions = {
	default: async (event) => {
		const form = parseForm(await event.request.formData(), forgotSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const { throttle, handle, mailer, config } = context();
		const limit = await throttle.request('reset', { address: clientAddress(event), account: form.data.email });
		if (!limit.ok) {
			event.setHeaders({ 'retry-after': String(limit.retryAfterSec) });
			return fail(429, { values: form.values, errors: { _: 'Too many reset requests. Wait a while and try again.' } as FieldErrors });
		}
		// Answer before looking the address up, so neither the answer nor its timing depends on
		// whether it has an account; either way one message is queued.
		const email = form.data.email;
		afterResponse('password reset', () => requestPasswordReset(handle.db, mailer, config.origin, email));
		return { sent: true, values: form.values };
	}
};
