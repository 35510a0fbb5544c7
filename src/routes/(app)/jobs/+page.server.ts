import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { dateText, jobReference, listJobs } from '$lib/server/jobs/repository';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'job.read', url);
	const show =
		url.searchParams.get('show') === 'all'
			? 'all'
			: url.searchParams.get('show') === 'mine'
				? 'mine'
				: viewer.role === 'technician'
					? 'mine'
					: 'open';
	const rows = await listJobs(context().handle.db, viewer.organisationId, {
		...(show === 'mine' ? { assigneeUserId: viewer.userId } : {}),
		...(show === 'open' ? { status: 'issued' as const } : {})
	});
	return {
		show,
		jobs: rows.map((j) => ({
			id: j.id,
			reference: jobReference(j.number),
			title: j.title,
			status: j.status,
			survey: j.survey_title,
			site: j.site_name,
			assignee: j.assignee_name,
			due: dateText(j.due_date),
			points: Number(j.points),
			recorded: Number(j.recorded),
			failing: Number(j.failing)
		}))
	};
};
