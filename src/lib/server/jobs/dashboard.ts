// The overview's "what is left for you", by role, in the order the work goes: engineers see
// surveys to review, approved surveys without jobs, jobs ready to close, failing points, jobs
// overdue and due this week, and machines without an approved survey; technicians see their
// jobs overdue and due, and their failing points; viewers see where installation stands. Each
// line links to the page where it is acted on.
import { sql } from 'kysely';
import type { DB } from '../db/index';
import type { Role } from '../db/types';
import { can } from '../auth/guard';
import { dateText, jobReference } from './repository';

export interface DashboardLine {
	href: string;
	title: string;
	detail: string;
	tone: 'stop' | 'caution' | 'neutral';
}

export interface DashboardSection {
	id: 'review' | 'issue' | 'close' | 'failing' | 'overdue' | 'due' | 'unsurveyed';
	title: string;
	lines: DashboardLine[];
	/** How many there are in all (lines are capped). */
	total: number;
}

const CAP = 8;

/** YYYY-MM-DD of `d` plus `days`, in the server's calendar. */
function day(d: Date, days = 0): string {
	const x = new Date(d);
	x.setDate(x.getDate() + days);
	return dateText(x)!;
}

export async function dashboardOf(
	db: DB,
	organisationId: string,
	viewer: { userId: string; role: Role },
	now: Date = new Date()
): Promise<DashboardSection[]> {
	const engineer = can(viewer.role, 'job.close');
	const mineOnly = viewer.role === 'technician';
	const today = day(now);
	const weekEnd = day(now, 7);
	const sections: DashboardSection[] = [];
	const add = (s: DashboardSection) => {
		if (s.total > 0) sections.push(s);
	};

	const openJobs = db
		.selectFrom('installation_job as j')
		.innerJoin('survey', (jn) => jn.onRef('survey.id', '=', 'j.survey_id').onRef('survey.organisation_id', '=', 'j.organisation_id'))
		.leftJoin('app_user as a', 'a.id', 'j.assignee_user_id')
		.select((eb) => [
			'j.id',
			'j.number',
			'j.title',
			'j.due_date',
			'survey.title as survey_title',
			'a.name as assignee_name',
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
				.as('recorded')
		])
		.where('j.organisation_id', '=', organisationId)
		.where('j.status', '=', 'issued')
		.$if(mineOnly, (q) => q.where('j.assignee_user_id', '=', viewer.userId))
		.orderBy('j.due_date', (o) => o.asc().nullsLast())
		.orderBy('j.number')
		.limit(500)
		.execute();

	const [jobs, review, toIssue, failing, unsurveyed] = await Promise.all([
		openJobs,
		engineer
			? db
					.selectFrom('survey')
					.innerJoin('site', 'site.id', 'survey.site_id')
					.select(['survey.id', 'survey.title', 'site.name as site_name', 'survey.updated_at'])
					.where('survey.organisation_id', '=', organisationId)
					.where('survey.status', '=', 'submitted')
					.where('survey.archived_at', 'is', null)
					.orderBy('survey.updated_at')
					.limit(200)
					.execute()
			: Promise.resolve([]),
		can(viewer.role, 'job.issue')
			? db
					.selectFrom('survey')
					.innerJoin('site', 'site.id', 'survey.site_id')
					.select(['survey.id', 'survey.title', 'site.name as site_name', 'survey.approved_at'])
					.where('survey.organisation_id', '=', organisationId)
					.where('survey.status', '=', 'approved')
					.where('survey.archived_at', 'is', null)
					.orderBy('survey.approved_at')
					.limit(200)
					.execute()
			: Promise.resolve([]),
		viewer.role === 'viewer'
			? Promise.resolve([])
			: db
					.selectFrom('job_point as jp')
					.innerJoin('installation_job as j', (jn) =>
						jn.onRef('j.id', '=', 'jp.job_id').onRef('j.organisation_id', '=', 'jp.organisation_id')
					)
					.innerJoin('revision_point as rp', (jn) =>
						jn.onRef('rp.revision_board_id', '=', 'jp.revision_board_id').onRef('rp.point_id', '=', 'jp.point_id')
					)
					.select(['jp.id', 'j.id as job_id', 'j.number', 'rp.label', 'jp.findings'])
					.where('jp.organisation_id', '=', organisationId)
					.where('j.status', '=', 'issued')
					.where('jp.worst', '=', 'fail')
					.$if(mineOnly, (q) => q.where('j.assignee_user_id', '=', viewer.userId))
					.orderBy('j.number')
					.orderBy('jp.number')
					.limit(200)
					.execute(),
		engineer
			? db
					.selectFrom('machine as m')
					.innerJoin('site', 'site.id', 'm.site_id')
					.select(['m.id', 'm.name', 'm.tag', 'site.name as site_name'])
					.where('m.organisation_id', '=', organisationId)
					.where('m.archived_at', 'is', null)
					.where(({ not, exists, selectFrom }) =>
						not(
							exists(
								selectFrom('survey_machine as sm')
									.innerJoin('survey as s', 's.id', 'sm.survey_id')
									.select(sql`1`.as('one'))
									.whereRef('sm.machine_id', '=', 'm.id')
									.where('s.status', 'in', ['approved', 'jobs_issued', 'closed'])
							)
						)
					)
					.orderBy('site.name')
					.orderBy('m.name')
					.limit(200)
					.execute()
			: Promise.resolve([])
	]);

	add({
		id: 'review',
		title: 'Surveys waiting for your review',
		total: review.length,
		lines: review.slice(0, CAP).map((s) => ({
			href: `/surveys/${s.id}`,
			title: s.title,
			detail: `${s.site_name} · submitted`,
			tone: 'caution'
		}))
	});
	add({
		id: 'issue',
		title: 'Approved surveys without jobs',
		total: toIssue.length,
		lines: toIssue.slice(0, CAP).map((s) => ({
			href: `/surveys/${s.id}/jobs/new`,
			title: s.title,
			detail: `${s.site_name} · issue the installation jobs`,
			tone: 'caution'
		}))
	});
	const ready = engineer ? jobs.filter((j) => Number(j.points) > 0 && Number(j.recorded) === Number(j.points)) : [];
	add({
		id: 'close',
		title: 'Jobs ready to review and close',
		total: ready.length,
		lines: ready.slice(0, CAP).map((j) => ({
			href: `/jobs/${j.id}`,
			title: `${jobReference(j.number)} ${j.title}`,
			detail: `every point recorded · ${j.survey_title}`,
			tone: 'neutral'
		}))
	});
	add({
		id: 'failing',
		title: 'Points failing as installed',
		total: failing.length,
		lines: failing.slice(0, CAP).map((p) => {
			const first = ((p.findings ?? []) as Array<{ severity: string; message: string }>).find((f) => f.severity === 'fail');
			return {
				href: `/jobs/${p.job_id}#point-${p.id}`,
				title: `${jobReference(p.number)} ${p.label}`,
				detail: first?.message ?? 'a failing finding',
				tone: 'stop'
			};
		})
	});
	const overdue = jobs.filter((j) => {
		const d = dateText(j.due_date);
		return d !== null && d < today;
	});
	const due = jobs.filter((j) => {
		const d = dateText(j.due_date);
		return d !== null && d >= today && d <= weekEnd;
	});
	const jobLine = (j: (typeof jobs)[number], tone: DashboardLine['tone']): DashboardLine => ({
		href: `/jobs/${j.id}`,
		title: `${jobReference(j.number)} ${j.title}`,
		detail: `due ${dateText(j.due_date)} · ${j.recorded} of ${j.points} points recorded${mineOnly ? '' : ` · ${j.assignee_name ?? 'not assigned'}`}`,
		tone
	});
	add({ id: 'overdue', title: 'Jobs overdue', total: overdue.length, lines: overdue.slice(0, CAP).map((j) => jobLine(j, 'stop')) });
	add({ id: 'due', title: 'Jobs due this week', total: due.length, lines: due.slice(0, CAP).map((j) => jobLine(j, 'caution')) });
	add({
		id: 'unsurveyed',
		title: 'Machines with no approved survey',
		total: unsurveyed.length,
		lines: unsurveyed.slice(0, CAP).map((m) => ({
			href: `/register/machines/${m.id}`,
			title: m.tag ? `${m.name} (${m.tag})` : m.name,
			detail: `${m.site_name} · plan a survey`,
			tone: 'neutral'
		}))
	});
	return sections;
}
