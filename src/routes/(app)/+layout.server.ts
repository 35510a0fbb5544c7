import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { NAV } from '$lib/nav';
import type { LayoutServerLoad } from './$types';

export const load: LayoutServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'organisation.read', url);
	return {
		viewer: {
			name: viewer.name,
			email: viewer.email,
			role: viewer.role,
			organisationName: viewer.organisationName,
			unitSystem: viewer.unitSystem
		},
		nav: NAV.filter((n) => can(viewer.role, n.action)).map(({ href, label }) => ({ href, label }))
	};
};
