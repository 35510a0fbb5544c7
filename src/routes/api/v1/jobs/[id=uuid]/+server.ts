import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { json, problem } from '$lib/server/http/problem';
import { jobDetail } from '$lib/server/integration/job-feed';
import type { RequestHandler } from './$types';

/** One installation job with its points, seat preparation, findings and as-installed records. */
export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'job.read');
	if (v instanceof Response) return v;
	const job = await jobDetail(context().handle.db, v.organisationId, params.id);
	return job ? json(job) : problem(404, 'No such job in your organisation.');
};
