import { error, fail, redirect } from '@sveltejs/kit';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import { loadJob } from '$lib/server/jobs/view';
import { closeJob, JobError, mayRecord } from '$lib/server/jobs/service';
import { closeBlockers } from '$lib/jobs/closing';
import { closeJobSchema } from '$lib/schemas/job';
import { parseForm } from '$lib/schemas/form';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const viewer = requirePage(locals, 'job.read', url);
	const view = await loadJob(context().handle.db, viewer.organisationId, params.id);
	if (!view) error(404, 'No such job in your organisation.');
	const actor = { userId: viewer.userId, role: viewer.role };
	return {
		view,
		canRecord: mayRecord(actor, { assignee_user_id: view.job.assigneeUserId, status: view.job.status }) === true,
		canClose: can(viewer.role, 'job.close') && view.job.status !== 'closed',
		blockers: closeBlockers(view.points.map((p) => ({ label: p.label, record: p.record })))
	};
};

export const actions: Actions = {
	close: async ({ locals, params, request, url }) => {
		const viewer = requirePage(locals, 'job.close', url);
		const parsed = parseForm(await request.formData(), closeJobSchema);
		if (!parsed.ok) return fail(400, { action: 'close' as const, values: parsed.values, errors: parsed.errors });
		try {
			await closeJob(context().handle.db, viewer.organisationId, params.id, { userId: viewer.userId, role: viewer.role }, parsed.data.note);
		} catch (e) {
			if (e instanceof JobError) {
				if (e.status === 404) error(404, e.message);
				return fail(e.status, { action: 'close' as const, values: parsed.values, errors: { note: e.message } });
			}
			throw e;
		}
		redirect(303, `/jobs/${params.id}?closed=1`);
	}
};
