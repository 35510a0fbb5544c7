import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as surveys from '$lib/server/db/surveys';
import { assignedSurveyIds, machinesWithBoards } from '$lib/server/db/survey-progress';
import { SURVEY_STATUS_TONE } from '$lib/survey/states';
import type { PageServerLoad } from './$types';

/** The next thing to do on a survey, in a few words. */
function nextStep(s: { status: string; machines: number; machinesWithBoard: number }): string {
	if (s.status === 'approved') return 'Approved: issue the installation jobs.';
	if (s.status === 'jobs_issued') return 'Jobs issued: install and record.';
	if (s.status === 'closed') return 'Closed.';
	if (s.status === 'submitted') return 'Waiting for the engineer’s review.';
	if (s.status === 'changes_requested') return 'Changes requested: make them and submit again.';
	if (s.machines === 0) return 'Pick the machines to walk.';
	const missing = s.machines - s.machinesWithBoard;
	if (missing > 0)
		return `${missing} of ${s.machines} ${s.machines === 1 ? 'machine has' : 'machines have'} no board yet: photograph and mark ${missing === 1 ? 'it' : 'them'}.`;
	return s.status === 'planned' ? 'Every machine has a board: start the site walk.' : 'Finish the boards and submit for review.';
}

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'survey.read', url);
	const db = context().handle.db;
	const [rows, boards, mine] = await Promise.all([
		surveys.list(db, viewer.organisationId),
		machinesWithBoards(db, viewer.organisationId),
		assignedSurveyIds(db, viewer.organisationId, viewer.userId)
	]);
	const items = rows.map((s) => {
		const machines = Number(s.machine_count ?? 0);
		const machinesWithBoard = boards.get(s.id) ?? 0;
		return {
			id: s.id,
			title: s.title,
			siteName: s.site_name,
			status: s.status,
			statusLabel: surveys.SURVEY_STATUS_LABEL[s.status],
			statusTone: SURVEY_STATUS_TONE[s.status],
			plannedDate: s.planned_date,
			machines,
			boards: Number(s.board_count ?? 0),
			mine: mine.has(s.id),
			next: nextStep({ status: s.status, machines, machinesWithBoard })
		};
	});
	const show = url.searchParams.get('show') === 'mine' ? 'mine' : 'all';
	return {
		items: show === 'mine' ? items.filter((i) => i.mine) : items,
		total: items.length,
		mineCount: items.filter((i) => i.mine).length,
		show,
		canPlan: can(viewer.role, 'survey.plan')
	};
};
