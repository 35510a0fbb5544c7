import { fail } from '@sveltejs/kit';
import { forgotSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { requestPasswordReset } from '$lib/server/auth/accounts';
import { context } from '$lib/server/context';
import type { Actions } from './$types';

export const actions: Actions = {
	default: async ({ request, getClientAddress }) => {
		const form = parseForm(await request.formData(), forgotSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const { limits, handle, mailer, config } = context();
		const a = limits.resetPerAddress.hit(getClientAddress());
		const b = limits.resetPerAccount.hit(form.data.email.toLowerCase());
		if (!a.ok || !b.ok) {
			return fail(429, { values: form.values, errors: { _: 'Too many reset requests. Wait a while and try again.' } as FieldErrors });
		}
		await requestPasswordReset(handle.db, mailer, config.origin, form.data.email);
		return { sent: true, values: form.values };
	}
};
