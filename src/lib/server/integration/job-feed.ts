// Installation jobs for an outside system: a changes-since feed ordered by (updated_at, id) with
// an opaque cursor, and one job with its points, seat preparation, findings and as-installed
// records, built from the jobs module's own view (the same data as the job page and the pack).
import { sql } from 'kysely';
import type { z } from 'zod';
import type { DB } from '../db/index';
import { isUuid } from '../../schemas/ids';
import type { jobDetailSchema, jobFeedSchema, jobSummarySchema } from '../../schemas/integration';
import { dateText, jobReference, jobSummaryQuery } from '../jobs/repository';
import { loadJob } from '../jobs/view';
import { CursorError } from './feed';

type Summary = z.infer<typeof jobSummarySchema>;

const encode = (id: string) => Buffer.from(`j:${id}`).toString('base64url');
function decode(cursor: string): string | null {
	const s = Buffer.from(cursor, 'base64url').toString('utf8');
	return s.startsWith('j:') && isUuid(s.slice(2)) ? s.slice(2) : null;
}
const iso = (d: Date | string | null) => (d == null ? null : new Date(d).toISOString());

const summaryQuery = jobSummaryQuery;

type Row = Awaited<ReturnType<ReturnType<typeof summaryQuery>['execute']>>[number];

function summaryOf(r: Row): Summary {
	return {
		id: r.id,
		reference: jobReference(r.number),
		title: r.title,
		status: r.status,
		surveyId: r.survey_id,
		surveyTitle: r.survey_title,
		site: r.site_name,
		revisionNumber: Number(r.revision_number),
		assigneeName: r.assignee_name,
		outageStart: iso(r.outage_start),
		outageEnd: iso(r.outage_end),
		due: dateText(r.due_date),
		lockoutRequired: r.lockout_required,
		issuedAt: iso(r.issued_at)!,
		closedAt: iso(r.closed_at),
		updatedAt: iso(r.updated_at)!,
		points: Number(r.points ?? 0),
		recorded: Number(r.recorded ?? 0),
		failing: Number(r.failing ?? 0),
		href: `/api/v1/jobs/${r.id}`
	};
}

/** Jobs changed (issued, recorded on, closed) at or after `since`, oldest change first. */
export async function jobsSince(
	db: DB,
	organisationId: string,
	q: { since?: string; cursor?: string; limit: number }
): Promise<z.infer<typeof jobFeedSchema>> {
	let query = summaryQuery(db, organisationId);
	if (q.since) query = query.where('j.updated_at', '>=', new Date(q.since));
	if (q.cursor) {
		const id = decode(q.cursor);
		const known = id
			? await db
					.selectFrom('installation_job')
					.select('id')
					.where('organisation_id', '=', organisationId)
					.where('id', '=', id)
					.executeTakeFirst()
			: null;
		if (!id || !known) throw new CursorError('This cursor is not one this feed gave out.');
		// A job changed again after the page was read comes back later in the feed: that is the point of it.
		query = query.where(sql<boolean>`(j.updated_at, j.id) > (select updated_at, id from installation_job where id = ${id})`);
	}
	const rows = await query
		.orderBy('j.updated_at')
		.orderBy('j.id')
		.limit(q.limit + 1)
		.execute();
	const page = rows.slice(0, q.limit);
	return { items: page.map(summaryOf), nextCursor: rows.length > q.limit ? encode(page[page.length - 1].id) : null };
}

/** One job of the organisation with everything it says; null when there is none. */
export async function jobDetail(db: DB, organisationId: string, id: string): Promise<z.infer<typeof jobDetailSchema> | null> {
	if (!isUuid(id)) return null;
	const [row, view] = await Promise.all([
		summaryQuery(db, organisationId).where('j.id', '=', id).executeTakeFirst(),
		loadJob(db, organisationId, id)
	]);
	if (!row || !view) return null;
	return {
		...summaryOf(row),
		notes: view.job.notes,
		closeNote: view.job.closeNote,
		tools: view.plan.tools,
		materials: view.plan.materials as unknown as Record<string, unknown>[],
		lockout: view.plan.lockout as unknown as Record<string, unknown>,
		jobPoints: view.points.map((p) => ({
			id: p.id,
			number: p.number,
			label: p.label,
			component: p.component,
			machineId: p.machineId,
			machine: p.machine,
			boardId: p.boardId,
			direction: p.direction,
			surface: p.surface,
			mounting: p.mounting,
			material: p.material,
			notes: p.notes,
			planFindings: p.planFindings,
			preparation: p.plan.preparation as unknown as Record<string, unknown>,
			preparationSummary: p.plan.summary,
			torqueLimitNm: p.plan.torqueLimitNm,
			conductor: p.plan.conductor,
			route: p.route
				? { lengthM: p.route.lengthM, crossSectionMm2: p.route.crossSectionMm2, supply: p.route.supply, supplyV: p.route.supplyV }
				: null,
			record: p.record
		}))
	};
}
