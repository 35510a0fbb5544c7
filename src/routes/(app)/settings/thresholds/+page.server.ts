import { fail } from '@sveltejs/kit';
import { firstErrors, parseThresholdForm } from '$lib/schemas/thresholds';
import { unitSystemOfForm } from '$lib/schemas/units';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import { getThresholds, resetThresholds, saveThresholds } from '$lib/server/db/thresholds';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'thresholds.read', url);
	const t = await getThresholds(context().handle.db, viewer.organisationId);
	return {
		effective: t.effective,
		overrides: t.overrides,
		issues: t.issues,
		canEdit: can(viewer.role, 'thresholds.edit')
	};
};

export const actions: Actions = {
	save: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'thresholds.edit', url);
		const formData = await request.formData();
		const { values, result } = parseThresholdForm(formData, unitSystemOfForm(formData, viewer.unitSystem));
		if (!result.ok) return fail(400, { action: 'save' as const, values, errors: firstErrors(result.errors) });
		const saved = await saveThresholds(context().handle.db, viewer.organisationId, result.overrides, { userId: viewer.userId });
		if (!saved.ok) return fail(400, { action: 'save' as const, values, errors: firstErrors(saved.errors) });
		return { action: 'save' as const, saved: true, changed: Object.keys(saved.overrides).length };
	},
	reset: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'thresholds.edit', url);
		const form = await request.formData();
		if (form.get('confirm') !== 'yes') {
			return fail(400, {
				action: 'reset' as const,
				errors: { _: 'Confirm the reset first: nothing was changed.' } as Record<string, string>
			});
		}
		await resetThresholds(context().handle.db, viewer.organisationId, { userId: viewer.userId });
		return { action: 'reset' as const, reset: true };
	}
};
