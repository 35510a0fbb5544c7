import { redirect } from '@sveltejs/kit';
import { endSession } from '$lib/server/auth/session';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = () => redirect(303, '/');

export const actions: Actions = {
	default: async ({ locals, cookies }) => {
		if (locals.viewer) await endSession(cookies, locals.viewer.sessionId);
		redirect(303, '/sign-in?signed-out=1');
	}
};
