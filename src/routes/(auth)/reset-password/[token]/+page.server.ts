import { fail, redirect } from '@sveltejs/kit';
import { resetSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { AccountError, findUsableReset, resetPassword } from '$lib/server/auth/accounts';
import { context } from '$lib/server/context';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ params }) => {
	const usable = await findUsableReset(context().handle.db, params.token);
	return { usable: Boolean(usable) };
};

export const actions: Actions = {
	default: async ({ request, params }) => {
		const form = parseForm(await request.formData(), resetSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		try {
			await resetPassword(context().handle.db, params.token, form.data.password);
		} catch (e) {
			if (e instanceof AccountError) return fail(410, { values: {}, errors: { _: e.message } as FieldErrors });
			throw e;
		}
		redirect(303, '/sign-in?reset=1');
	}
};
