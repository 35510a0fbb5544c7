// Surveys: a planned walk of some machines of one site, with the people assigned to it.
// Status moves (and archiving) go through the review workflow (src/lib/server/review/workflow.ts),
// which checks the transition table in src/lib/survey/states.ts and keeps the audit trail.
import { sql } from 'kysely';
import type { DB } from './index';
import type { SurveyAssigneeRole, SurveyStatus } from './types';
export { SURVEY_STATUSES, SURVEY_STATUS_LABEL } from '../../survey/states';

export class SurveyRuleError extends Error {}

const columns = [
	'survey.id',
	'survey.organisation_id',
	'survey.site_id',
	'survey.title',
	'survey.status',
	'survey.notes',
	'survey.created_by',
	'survey.approved_at',
	'survey.approved_by',
	'survey.archived_at',
	'survey.created_at',
	'survey.updated_at',
	'site.name as site_name'
] as const;

// A calendar date comes back as text so no time zone shifts it.
const plannedDate = sql<string | null>`to_char(survey.planned_date, 'YYYY-MM-DD')`.as('planned_date');

export function list(db: DB, organisationId: string, opts: { includeArchived?: boolean; status?: SurveyStatus; siteId?: string } = {}) {
	let q = db
		.selectFrom('survey')
		.innerJoin('site', (j) => j.onRef('site.id', '=', 'survey.site_id').onRef('site.organisation_id', '=', 'survey.organisation_id'))
		.select(columns)
		.select(plannedDate)
		.select((eb) => [
			eb
				.selectFrom('survey_machine')
				.select(eb.fn.countAll<string>().as('n'))
				.whereRef('survey_machine.survey_id', '=', 'survey.id')
				.as('machine_count'),
			eb.selectFrom('board').select(eb.fn.countAll<string>().as('n')).whereRef('board.survey_id', '=', 'survey.id').as('board_count')
		])
		.where('survey.organisation_id', '=', organisationId);
	if (!opts.includeArchived) q = q.where('survey.archived_at', 'is', null);
	if (opts.status) q = q.where('survey.status', '=', opts.status);
	if (opts.siteId) q = q.where('survey.site_id', '=', opts.siteId);
	return q
		.orderBy('survey.planned_date', (ob) => ob.desc().nullsLast())
		.orderBy('survey.created_at', 'desc')
		.execute();
}

export function get(db: DB, organisationId: string, id: string) {
	return db
		.selectFrom('survey')
		.innerJoin('site', (j) => j.onRef('site.id', '=', 'survey.site_id').onRef('site.organisation_id', '=', 'survey.organisation_id'))
		.select(columns)
		.select(plannedDate)
		.where('survey.organisation_id', '=', organisationId)
		.where('survey.id', '=', id)
		.executeTakeFirst();
}

export interface SurveyInput {
	siteId: string;
	title: string;
	plannedDate?: string | null;
	notes?: string;
	machineIds?: string[];
	assignees?: Array<{ userId: string; role: SurveyAssigneeRole }>;
}

/** Creates a survey; null when the site is not one of the organisation's live sites. */
export async function create(db: DB, organisationId: string, createdBy: string | null, input: SurveyInput) {
	return db.transaction().execute(async (trx) => {
		const site = await trx
			.selectFrom('site')
			.select('id')
			.where('organisation_id', '=', organisationId)
			.where('id', '=', input.siteId)
			.where('archived_at', 'is', null)
			.executeTakeFirst();
		if (!site) return null;
		const row = await trx
			.insertInto('survey')
			.values({
				organisation_id: organisationId,
				site_id: input.siteId,
				title: input.title,
				planned_date: input.plannedDate ?? null,
				notes: input.notes ?? '',
				created_by: createdBy
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		if (input.machineIds) await writeMachines(trx, organisationId, row.id, input.siteId, input.machineIds);
		if (input.assignees) await writeAssignees(trx, organisationId, row.id, input.assignees);
		return row;
	});
}

export async function update(
	db: DB,
	organisationId: string,
	id: string,
	input: Partial<Pick<SurveyInput, 'title' | 'plannedDate' | 'notes'>>
) {
	const r = await db
		.updateTable('survey')
		.set({
			...(input.title !== undefined ? { title: input.title } : {}),
			...(input.plannedDate !== undefined ? { planned_date: input.plannedDate } : {}),
			...(input.notes !== undefined ? { notes: input.notes } : {}),
			updated_at: new Date()
		})
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return Boolean(r);
}

async function writeMachines(trx: DB, organisationId: string, surveyId: string, siteId: string, machineIds: string[]) {
	const unique = [...new Set(machineIds)];
	if (unique.length) {
		const found = await trx
			.selectFrom('machine')
			.select('id')
			.where('organisation_id', '=', organisationId)
			.where('site_id', '=', siteId)
			.where('id', 'in', unique)
			.execute();
		if (found.length !== unique.length) throw new SurveyRuleError('Every machine must be a machine of the survey’s site.');
	}
	await trx.deleteFrom('survey_machine').where('survey_id', '=', surveyId).execute();
	if (unique.length) {
		await trx
			.insertInto('survey_machine')
			.values(unique.map((machine_id, position) => ({ organisation_id: organisationId, survey_id: surveyId, machine_id, position })))
			.execute();
	}
}

async function writeAssignees(
	trx: DB,
	organisationId: string,
	surveyId: string,
	assignees: Array<{ userId: string; role: SurveyAssigneeRole }>
) {
	const ids = [...new Set(assignees.map((a) => a.userId))];
	if (ids.length !== assignees.length) throw new SurveyRuleError('A person can be assigned once.');
	if (ids.length) {
		const found = await trx
			.selectFrom('member')
			.select('user_id')
			.where('organisation_id', '=', organisationId)
			.where('user_id', 'in', ids)
			.execute();
		if (found.length !== ids.length) throw new SurveyRuleError('Only members of the organisation can be assigned.');
	}
	await trx.deleteFrom('survey_assignee').where('survey_id', '=', surveyId).execute();
	if (assignees.length) {
		await trx
			.insertInto('survey_assignee')
			.values(assignees.map((a) => ({ survey_id: surveyId, user_id: a.userId, role: a.role })))
			.execute();
	}
}

/**
 * Saves an edited plan (details, machines, people) in one transaction, so a refused machine
 * list leaves the details as they were. False when the survey is not found.
 */
export async function replacePlan(
	db: DB,
	organisationId: string,
	surveyId: string,
	input: Pick<SurveyInput, 'title' | 'plannedDate' | 'notes'> & {
		machineIds: string[];
		assignees: Array<{ userId: string; role: SurveyAssigneeRole }>;
	}
) {
	return db.transaction().execute(async (trx) => {
		const s = await trx
			.selectFrom('survey')
			.select(['site_id'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', surveyId)
			.forUpdate()
			.executeTakeFirst();
		if (!s) return false;
		await trx
			.updateTable('survey')
			.set({ title: input.title, planned_date: input.plannedDate ?? null, notes: input.notes ?? '', updated_at: new Date() })
			.where('organisation_id', '=', organisationId)
			.where('id', '=', surveyId)
			.execute();
		await writeMachines(trx, organisationId, surveyId, s.site_id, input.machineIds);
		await writeAssignees(trx, organisationId, surveyId, input.assignees);
		return true;
	});
}

/** Replaces the machines to walk (all of the survey's site). False when the survey is not found. */
export async function setMachines(db: DB, organisationId: string, surveyId: string, machineIds: string[]) {
	return db.transaction().execute(async (trx) => {
		const s = await trx
			.selectFrom('survey')
			.select(['site_id'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', surveyId)
			.executeTakeFirst();
		if (!s) return false;
		await writeMachines(trx, organisationId, surveyId, s.site_id, machineIds);
		return true;
	});
}

export async function setAssignees(
	db: DB,
	organisationId: string,
	surveyId: string,
	assignees: Array<{ userId: string; role: SurveyAssigneeRole }>
) {
	return db.transaction().execute(async (trx) => {
		const s = await trx
			.selectFrom('survey')
			.select('id')
			.where('organisation_id', '=', organisationId)
			.where('id', '=', surveyId)
			.executeTakeFirst();
		if (!s) return false;
		await writeAssignees(trx, organisationId, surveyId, assignees);
		return true;
	});
}

export function listMachines(db: DB, organisationId: string, surveyId: string) {
	return db
		.selectFrom('survey_machine')
		.innerJoin('machine', (j) =>
			j.onRef('machine.id', '=', 'survey_machine.machine_id').onRef('machine.organisation_id', '=', 'survey_machine.organisation_id')
		)
		.select([
			'machine.id',
			'machine.name',
			'machine.tag',
			'machine.kind',
			'machine.area_id',
			'machine.hazardous_area',
			'survey_machine.position'
		])
		.where('survey_machine.organisation_id', '=', organisationId)
		.where('survey_machine.survey_id', '=', surveyId)
		.orderBy('survey_machine.position')
		.execute();
}

export function listAssignees(db: DB, organisationId: string, surveyId: string) {
	return db
		.selectFrom('survey_assignee')
		.innerJoin('survey', 'survey.id', 'survey_assignee.survey_id')
		.innerJoin('app_user', 'app_user.id', 'survey_assignee.user_id')
		.select(['survey_assignee.user_id', 'survey_assignee.role', 'app_user.name', 'app_user.email'])
		.where('survey.organisation_id', '=', organisationId)
		.where('survey_assignee.survey_id', '=', surveyId)
		.orderBy('app_user.name')
		.execute();
}
