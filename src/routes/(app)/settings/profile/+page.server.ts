import { fail } from '@sveltejs/kit';
import { parseForm } from '$lib/schemas/form';
import { unitPreferenceSchema } from '$lib/schemas/units';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { setUnitSystem } from '$lib/server/db/users';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'organisation.read', url);
	return { unitSystem: viewer.unitSystem };
};

export const actions: Actions = {
	units: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'organisation.read', url);
		const form = parseForm(await request.formData(), unitPreferenceSchema);
		if (!form.ok) return fail(400, { values: form.values, errors: form.errors });
		await setUnitSystem(context().handle.db, viewer.userId, form.data.unitSystem);
		return { saved: true };
	}
};
