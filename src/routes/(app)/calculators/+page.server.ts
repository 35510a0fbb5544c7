import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { getThresholds } from '$lib/server/db/thresholds';
import { listMachinesWithBearingGeometry } from '$lib/server/db/bearing-geometry';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'register.read', url);
	const db = context().handle.db;
	const [thresholds, machines] = await Promise.all([
		getThresholds(db, viewer.organisationId),
		listMachinesWithBearingGeometry(db, viewer.organisationId)
	]);
	return { thresholds: thresholds.effective, thresholdsChanged: Object.keys(thresholds.overrides).length, machines };
};
