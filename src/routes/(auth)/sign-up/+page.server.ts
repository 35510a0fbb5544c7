import { fail, redirect } from '@sveltejs/kit';
import { signUpSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { AccountError, signUp } from '$lib/server/auth/accounts';
import { startSession } from '$lib/server/auth/session';
import { context } from '$lib/server/context';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = ({ locals }) => {
	if (locals.viewer) redirect(303, '/');
};

export const actions: Actions = {
	default: async ({ request, cookies }) => {
		const form = parseForm(await request.formData(), signUpSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		try {
			const { userId, organisationId } = await signUp(context().handle.db, form.data);
			await startSession(cookies, userId, organisationId);
		} catch (e) {
			if (e instanceof AccountError) {
				return fail(e.status, { values: form.values, errors: { [e.field ?? '_']: e.message } as FieldErrors });
			}
			throw e;
		}
		redirect(303, '/?welcome=1');
	}
};
