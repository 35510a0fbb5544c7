// Installation jobs: rows in, rows out. Every function takes the organisation id and filters by
// it; a job of another organisation is simply not found. Side effects (mail, survey moves) are
// in service.ts.
import type { Transaction } from 'kysely';
import type { DB } from '../db/index';
import type { Database } from '../db/types';
import type { JobStatus } from '../db/job-types';
import { isUuid } from '../../schemas/ids';

type Q = DB | Transaction<Database>;

/** J-0007: the number a job is known by on site and in exports. */
export function jobReference(n: number): string {
	return `J-${String(n).padStart(4, '0')}`;
}

/** A pg date (a Date at local midnight, or text) as YYYY-MM-DD. */
export function dateText(v: Date | string | null | undefined): string | null {
	if (v == null) return null;
	if (typeof v === 'string') return v.slice(0, 10);
	const p = (n: number) => String(n).padStart(2, '0');
	return `${v.getFullYear()}-${p(v.getMonth() + 1)}-${p(v.getDate())}`;
}

export interface JobListFilter {
	surveyId?: string;
	assigneeUserId?: string;
	status?: JobStatus;
}

/** Jobs of the organisation with their survey, site, assignee and how many points are recorded or failing. */
export function jobSummaryQuery(db: Q, organisationId: string) {
	return db
		.selectFrom('installation_job as j')
		.innerJoin('survey', (jn) => jn.onRef('survey.id', '=', 'j.survey_id').onRef('survey.organisation_id', '=', 'j.organisation_id'))
		.innerJoin('site', 'site.id', 'survey.site_id')
		.innerJoin('survey_revision as rev', 'rev.id', 'j.revision_id')
		.leftJoin('app_user as a', 'a.id', 'j.assignee_user_id')
		.select((eb) => [
			'j.id',
			'j.number',
			'j.title',
			'j.status',
			'j.survey_id',
			'j.assignee_user_id',
			'j.outage_start',
			'j.outage_end',
			'j.due_date',
			'j.lockout_required',
			'j.issued_at',
			'j.closed_at',
			'j.close_note',
			'j.updated_at',
			'survey.title as survey_title',
			'site.name as site_name',
			'rev.number as revision_number',
			'a.name as assignee_name',
			'a.email as assignee_email',
			eb
				.selectFrom('job_point as p')
				.select((e) => e.fn.countAll<string>().as('n'))
				.whereRef('p.job_id', '=', 'j.id')
				.as('points'),
			eb
				.selectFrom('job_point as p')
				.select((e) => e.fn.countAll<string>().as('n'))
				.whereRef('p.job_id', '=', 'j.id')
				.where('p.recorded_at', 'is not', null)
				.as('recorded'),
			eb
				.selectFrom('job_point as p')
				.select((e) => e.fn.countAll<string>().as('n'))
				.whereRef('p.job_id', '=', 'j.id')
				.where('p.worst', '=', 'fail')
				.as('failing')
		])
		.where('j.organisation_id', '=', organisationId);
}

/** Jobs with their survey, site, assignee and how many points are recorded or failing. */
export function listJobs(db: Q, organisationId: string, filter: JobListFilter = {}) {
	let q = jobSummaryQuery(db, organisationId);
	if (filter.surveyId) q = q.where('j.survey_id', '=', filter.surveyId);
	if (filter.assigneeUserId) q = q.where('j.assignee_user_id', '=', filter.assigneeUserId);
	if (filter.status) q = q.where('j.status', '=', filter.status);
	return q
		.orderBy('j.due_date', (o) => o.asc().nullsLast())
		.orderBy('j.number')
		.limit(1000)
		.execute();
}

export type JobListRow = Awaited<ReturnType<typeof listJobs>>[number];

/** One job's row, or undefined when it is not the organisation's. */
export function getJobRow(db: Q, organisationId: string, jobId: string) {
	return db
		.selectFrom('installation_job as j')
		.innerJoin('survey', (jn) => jn.onRef('survey.id', '=', 'j.survey_id').onRef('survey.organisation_id', '=', 'j.organisation_id'))
		.innerJoin('site', 'site.id', 'survey.site_id')
		.innerJoin('survey_revision as rev', 'rev.id', 'j.revision_id')
		.innerJoin('organisation as o', 'o.id', 'j.organisation_id')
		.leftJoin('app_user as a', 'a.id', 'j.assignee_user_id')
		.leftJoin('app_user as c', 'c.id', 'j.closed_by')
		.selectAll('j')
		.select([
			'survey.title as survey_title',
			'survey.status as survey_status',
			'site.name as site_name',
			'rev.number as revision_number',
			'o.name as organisation_name',
			'a.name as assignee_name',
			'a.email as assignee_email',
			'c.name as closed_by_name'
		])
		.where('j.organisation_id', '=', organisationId)
		.where('j.id', '=', jobId)
		.executeTakeFirst();
}

export type JobRow = NonNullable<Awaited<ReturnType<typeof getJobRow>>>;

/** A job's points with the approved revision point and its machine, in job order. */
export function listJobPoints(db: Q, organisationId: string, jobId: string) {
	return db
		.selectFrom('job_point as jp')
		.innerJoin('revision_point as rp', (j) =>
			j.onRef('rp.revision_board_id', '=', 'jp.revision_board_id').onRef('rp.point_id', '=', 'jp.point_id')
		)
		.innerJoin('revision_board as rb', 'rb.id', 'jp.revision_board_id')
		.innerJoin('machine as m', (j) => j.onRef('m.id', '=', 'rb.machine_id').onRef('m.organisation_id', '=', 'jp.organisation_id'))
		.leftJoin('app_user as u', 'u.id', 'jp.recorded_by')
		.select([
			'jp.id',
			'jp.number',
			'jp.revision_board_id',
			'jp.point_id',
			'jp.mounting_used',
			'jp.torque_nm',
			'jp.supply_v',
			'jp.polarity_ok',
			'jp.photo_media_id',
			'jp.ready_at',
			'jp.baseline_start_at',
			'jp.deviation',
			'jp.deviation_reason',
			'jp.findings as record_findings',
			'jp.worst as record_worst',
			'jp.recorded_at',
			'jp.record_key',
			'u.name as recorded_by_name',
			'rp.label',
			'rp.component',
			'rp.x',
			'rp.y',
			'rp.direction',
			'rp.surface',
			'rp.mounting',
			'rp.material',
			'rp.notes',
			'rp.findings as plan_findings',
			'rp.worst as plan_worst',
			'rb.board_id',
			'rb.title as board_title',
			'rb.media_id as board_media_id',
			'rb.machine_id',
			'm.name as machine_name',
			'm.tag as machine_tag',
			'm.hazardous_area'
		])
		.where('jp.organisation_id', '=', organisationId)
		.where('jp.job_id', '=', jobId)
		.orderBy('jp.number')
		.execute();
}

export type JobPointListRow = Awaited<ReturnType<typeof listJobPoints>>[number];

/** Cable routes on revision boards, with their supply point (the organisation's only). */
export async function listRoutesOfBoards(db: Q, organisationId: string, revisionBoardIds: string[]) {
	if (!revisionBoardIds.length) return [];
	const routes = await db
		.selectFrom('revision_route as rr')
		.select([
			'rr.revision_board_id',
			'rr.route_id',
			'rr.point_id',
			'rr.supply_point_id',
			'rr.vertices',
			'rr.length_m',
			'rr.cross_section_mm2',
			'rr.exit_label',
			'rr.supply_v'
		])
		.where('rr.revision_board_id', 'in', revisionBoardIds)
		.orderBy('rr.route_id')
		.execute();
	// The revision keeps the supply point's id as the board stored it (text); only well-formed ids
	// of this organisation's supply points are looked up.
	const ids = [...new Set(routes.map((r) => r.supply_point_id).filter((x): x is string => isUuid(x)))];
	const supplies = ids.length
		? await db
				.selectFrom('supply_point')
				.select(['id', 'name', 'tag'])
				.where('organisation_id', '=', organisationId)
				.where('id', 'in', ids)
				.execute()
		: [];
	const byId = new Map(supplies.map((s) => [s.id, s]));
	return routes.map((r) => {
		const sp = r.supply_point_id ? byId.get(r.supply_point_id) : undefined;
		return { ...r, supply_name: sp?.name ?? null, supply_tag: sp?.tag ?? null };
	});
}

/** Zones of the revision boards a job's points are on (drawn on the pack's board image). */
export function listZonesOfBoards(db: Q, revisionBoardIds: string[]) {
	if (!revisionBoardIds.length) return Promise.resolve([]);
	return db
		.selectFrom('revision_zone')
		.select(['revision_board_id', 'label', 'kind', 'polygon'])
		.where('revision_board_id', 'in', revisionBoardIds)
		.execute();
}

/** The latest revision of a survey with its approved points grouped by machine (the default jobs). */
export async function approvedPointsOfLatestRevision(db: Q, organisationId: string, surveyId: string) {
	const rev = await db
		.selectFrom('survey_revision')
		.select(['id', 'number'])
		.where('organisation_id', '=', organisationId)
		.where('survey_id', '=', surveyId)
		.orderBy('number', 'desc')
		.limit(1)
		.executeTakeFirst();
	if (!rev) return null;
	const points = await db
		.selectFrom('revision_point as rp')
		.innerJoin('revision_board as rb', 'rb.id', 'rp.revision_board_id')
		.innerJoin('machine as m', (j) => j.onRef('m.id', '=', 'rb.machine_id').on('m.organisation_id', '=', organisationId))
		.leftJoin('job_point as jp', (j) =>
			j.onRef('jp.revision_board_id', '=', 'rp.revision_board_id').onRef('jp.point_id', '=', 'rp.point_id')
		)
		.select([
			'rp.revision_board_id',
			'rp.point_id',
			'rp.label',
			'rp.component',
			'rp.mounting',
			'rp.material',
			'rp.worst',
			'rb.title as board_title',
			'rb.machine_id',
			'm.name as machine_name',
			'm.tag as machine_tag',
			'jp.job_id'
		])
		.where('rp.revision_id', '=', rev.id)
		.where('rp.status', '=', 'approved')
		.orderBy('m.name')
		.orderBy('rb.title')
		.orderBy('rp.label')
		.execute();
	return { revision: { id: rev.id, number: Number(rev.number) }, points };
}

/** Members who may carry out a job (record as-installed data). */
export function assignableMembers(db: Q, organisationId: string) {
	return db
		.selectFrom('member')
		.innerJoin('app_user', 'app_user.id', 'member.user_id')
		.select(['app_user.id', 'app_user.name', 'app_user.email', 'member.role'])
		.where('member.organisation_id', '=', organisationId)
		.where('member.role', 'in', ['admin', 'engineer', 'technician'])
		.orderBy('app_user.name')
		.execute();
}
