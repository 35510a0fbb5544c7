import { fail, redirect } from '@sveltejs/kit';
import { type FieldErrors } from '$lib/schemas/form';
import { AccountError, confirmSignUp, findUsableSignUp } from '$lib/server/auth/accounts';
import { endSession, startSession } from '$lib/server/auth/session';
import { context } from '$lib/server/context';
import type { Actions, PageServerLoad } from './$types';

// Opening the link only shows a button: mail scanners that fetch links must not create anything.
export const load: PageServerLoad = async ({ params }) => {
	const req = await findUsableSignUp(context().handle.db, params.token);
	return { request: req ? { email: req.email, name: req.name, organisationName: req.organisation_name } : null };
};

export const actions: Actions = {
	default: async ({ params, cookies, locals }) => {
		let who;
		try {
			who = await confirmSignUp(context().handle.db, params.token);
		} catch (e) {
			if (e instanceof AccountError) return fail(e.status, { errors: { _: e.message } as FieldErrors });
			throw e;
		}
		if (locals.viewer) await endSession(cookies, locals.viewer.sessionId);
		await startSession(cookies, who.userId, who.organisationId);
		redirect(303, '/?welcome=1');
	}
};
