// Exports of installation jobs: ?format=csv|json, ?what=jobs|points (CSV), optionally ?job=<id>
// or ?survey=<id>. Always the reader's organisation only.
import { z } from 'zod';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { problem } from '$lib/server/http/problem';
import { listJobs } from '$lib/server/jobs/repository';
import { loadJob, type JobView } from '$lib/server/jobs/view';
import { jobsToCsv, jobsToJson, pointsToCsv } from '$lib/server/jobs/export';
import { optionalIdField } from '$lib/schemas/ids';
import type { RequestHandler } from './$types';

const query = z.object({
	format: z.enum(['csv', 'json'], { error: 'format is csv or json.' }).default('csv'),
	what: z.enum(['jobs', 'points'], { error: 'what is jobs or points.' }).default('jobs'),
	job: optionalIdField('job must be a job id.').default(null),
	survey: optionalIdField('survey must be a survey id.').default(null)
});

export const GET: RequestHandler = async ({ locals, url }) => {
	const v = requireApi(locals, 'job.read');
	if (v instanceof Response) return v;
	const q = query.safeParse(Object.fromEntries(url.searchParams));
	if (!q.success) return problem(400, q.error.issues.map((i) => i.message).join(' '));
	const db = context().handle.db;
	const ids = q.data.job
		? [q.data.job]
		: (await listJobs(db, v.organisationId, q.data.survey ? { surveyId: q.data.survey } : {})).map((j) => j.id);
	const views: JobView[] = [];
	for (const id of ids) {
		const view = await loadJob(db, v.organisationId, id);
		if (view) views.push(view);
	}
	if (q.data.job && views.length === 0) return problem(404, 'No such job in your organisation.');
	const stamp = new Date().toISOString().slice(0, 10);
	const name = q.data.job && views[0] ? views[0].job.reference : `jobs-${stamp}`;
	if (q.data.format === 'json') {
		return new Response(JSON.stringify(jobsToJson(views), null, 2), {
			headers: {
				'content-type': 'application/json; charset=utf-8',
				'content-disposition': `attachment; filename="${name}.json"`,
				'x-content-type-options': 'nosniff'
			}
		});
	}
	const body = q.data.what === 'points' ? pointsToCsv(views) : jobsToCsv(views);
	return new Response(body, {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="${name}-${q.data.what}.csv"`,
			'x-content-type-options': 'nosniff'
		}
	});
};
