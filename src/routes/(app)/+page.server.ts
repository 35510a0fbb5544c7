import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import { mentionsOf } from '$lib/server/review/comments';
import { awaitingSurveys } from '$lib/server/review/awaiting';
import { dashboardOf } from '$lib/server/jobs/dashboard';
import { firstRun } from '$lib/server/first-run';
import { plainBody } from '$lib/survey/mentions';
import { SETTLED_STATUSES } from '$lib/survey/states';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'organisation.read', url);
	const db = context().handle.db;
	const [memberCount, openInvitations, mySurveys, awaiting, mentions, dashboard, start] = await Promise.all([
		db
			.selectFrom('member')
			.select((eb) => eb.fn.countAll<string>().as('n'))
			.where('organisation_id', '=', viewer.organisationId)
			.executeTakeFirstOrThrow(),
		can(viewer.role, 'member.invite')
			? db
					.selectFrom('invitation')
					.select((eb) => eb.fn.countAll<string>().as('n'))
					.where('organisation_id', '=', viewer.organisationId)
					.where('accepted_at', 'is', null)
					.where('revoked_at', 'is', null)
					.where('expires_at', '>', new Date())
					.executeTakeFirstOrThrow()
			: Promise.resolve({ n: '0' }),
		db
			.selectFrom('survey')
			.innerJoin('survey_assignee', 'survey_assignee.survey_id', 'survey.id')
			.innerJoin('site', 'site.id', 'survey.site_id')
			.select(['survey.id', 'survey.title', 'survey.status', 'survey.planned_date', 'site.name as site_name', 'survey_assignee.role'])
			.where('survey.organisation_id', '=', viewer.organisationId)
			.where('survey_assignee.user_id', '=', viewer.userId)
			.where('survey.archived_at', 'is', null)
			.where('survey.status', 'not in', [...SETTLED_STATUSES])
			.orderBy('survey.planned_date')
			.limit(10)
			.execute(),
		awaitingSurveys(db, viewer.organisationId, viewer.userId, viewer.role),
		mentionsOf(db, viewer.organisationId, viewer.userId, 10),
		dashboardOf(db, viewer.organisationId, { userId: viewer.userId, role: viewer.role }),
		firstRun(db, viewer.organisationId, viewer.role)
	]);
	return {
		welcome: url.searchParams.has('welcome'),
		joined: url.searchParams.has('joined'),
		members: Number(memberCount.n),
		openInvitations: Number(openInvitations.n),
		canInvite: can(viewer.role, 'member.invite'),
		awaiting,
		dashboard,
		firstRun: start,
		mentions: mentions.map((m) => ({
			id: m.id,
			surveyId: m.survey_id,
			surveyTitle: m.survey_title,
			href: m.board_id && m.target_kind !== 'survey' ? `/surveys/${m.survey_id}/boards/${m.board_id}` : `/surveys/${m.survey_id}#comments`,
			author: m.author_name ?? 'A former member',
			excerpt: plainBody(m.body).slice(0, 200),
			at: new Date(m.created_at).toISOString()
		})),
		mySurveys: mySurveys.map((x) => ({
			id: x.id,
			title: x.title,
			status: x.status,
			site: x.site_name,
			role: x.role,
			plannedDate: x.planned_date
				? String(x.planned_date instanceof Date ? x.planned_date.toISOString().slice(0, 10) : x.planned_date)
				: null
		}))
	};
};
