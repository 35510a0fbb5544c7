// Surveys waiting for the reader: a technician's assigned surveys being walked or sent back with
// changes; an engineer's (or admin's) submitted surveys, assigned to them or with no engineer.
import type { DB } from '../db/index';
import type { Role } from '../db/types';
import { awaitsAction } from '../../survey/todo';
import { SURVEY_STATUS_LABEL, type SurveyStatus } from '../../survey/states';

export async function awaitingSurveys(db: DB, organisationId: string, userId: string, role: Role) {
	if (role === 'viewer') return [];
	const statuses: SurveyStatus[] =
		role === 'technician'
			? ['planned', 'walking', 'changes_requested']
			: ['planned', 'walking', 'changes_requested', 'submitted', 'approved'];
	const rows = await db
		.selectFrom('survey')
		.innerJoin('site', (j) => j.onRef('site.id', '=', 'survey.site_id').onRef('site.organisation_id', '=', 'survey.organisation_id'))
		.leftJoin('survey_assignee as mine', (j) => j.onRef('mine.survey_id', '=', 'survey.id').on('mine.user_id', '=', userId))
		.select((eb) => [
			'survey.id',
			'survey.title',
			'survey.status',
			'survey.updated_at',
			'site.name as site_name',
			'mine.role as assigned_as',
			eb
				.exists(
					eb
						.selectFrom('survey_assignee as e')
						.select('e.user_id')
						.whereRef('e.survey_id', '=', 'survey.id')
						.where('e.role', '=', 'engineer')
				)
				.as('has_engineer')
		])
		.where('survey.organisation_id', '=', organisationId)
		.where('survey.archived_at', 'is', null)
		.where('survey.status', 'in', statuses)
		.orderBy('survey.updated_at', 'desc')
		.limit(200)
		.execute();
	const out: Array<{ id: string; title: string; site: string; status: SurveyStatus; statusLabel: string; why: string }> = [];
	for (const r of rows) {
		// An engineer is asked about an unassigned survey only once it is submitted.
		const assigned = r.assigned_as ?? (role !== 'technician' && r.status === 'submitted' && !r.has_engineer ? 'engineer' : null);
		if (!assigned) continue;
		const why = awaitsAction(r.status, role, assigned);
		if (why) out.push({ id: r.id, title: r.title, site: r.site_name, status: r.status, statusLabel: SURVEY_STATUS_LABEL[r.status], why });
	}
	return out.slice(0, 20);
}
