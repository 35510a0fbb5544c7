import { fail, redirect } from '@sveltejs/kit';
import { signInSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { checkCredentials } from '$lib/server/auth/accounts';
import { startSession } from '$lib/server/auth/session';
import { context } from '$lib/server/context';
import type { Actions, PageServerLoad } from './$types';

function safeNext(next: string | null): string {
	return next && next.startsWith('/') && !next.startsWith('//') ? next : '/';
}

export const load: PageServerLoad = ({ locals, url }) => {
	if (locals.viewer) redirect(303, safeNext(url.searchParams.get('next')));
	return { signedOut: url.searchParams.has('signed-out'), reset: url.searchParams.has('reset') };
};

export const actions: Actions = {
	default: async ({ request, cookies, url, getClientAddress }) => {
		const form = parseForm(await request.formData(), signInSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		const { limits, handle } = context();
		const byAddress = limits.signInPerAddress.hit(getClientAddress());
		const byAccount = limits.signInPerAccount.hit(form.data.email.toLowerCase());
		if (!byAddress.ok || !byAccount.ok) {
			const wait = Math.max(byAddress.retryAfterSec, byAccount.retryAfterSec);
			return fail(429, {
				values: form.values,
				errors: { _: `Too many sign-in attempts. Wait ${Math.ceil(wait / 60)} minute(s) and try again.` } as FieldErrors
			});
		}
		const who = await checkCredentials(handle.db, form.data.email, form.data.password);
		if (!who) {
			return fail(400, { values: form.values, errors: { password: 'Wrong e-mail or password.' } as FieldErrors });
		}
		limits.signInPerAccount.reset(form.data.email.toLowerCase());
		await startSession(cookies, who.userId, who.organisationId);
		redirect(303, safeNext(url.searchParams.get('next')));
	}
};
