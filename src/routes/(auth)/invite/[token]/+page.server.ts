import { fail, redirect } from '@sveltejs/kit';
import { acceptInviteSchema } from '$lib/schemas/auth';
import { parseForm, type FieldErrors } from '$lib/schemas/form';
import { AccountError, acceptInvitation, findOpenInvitation } from '$lib/server/auth/accounts';
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
	default: async ({ request, params, cookies, locals }) => {
		const form = parseForm(await request.formData(), acceptInviteSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		let who;
		try {
			who = await acceptInvitation(context().handle.db, params.token, form.data);
		} catch (e) {
			if (e instanceof AccountError) return fail(e.status, { values: form.values, errors: { [e.field ?? '_']: e.message } as FieldErrors });
			throw e;
		}
		if (locals.viewer) await endSession(cookies, locals.viewer.sessionId);
		await startSession(cookies, who.userId, who.organisationId);
		redirect(303, '/?joined=1');
	}
};
