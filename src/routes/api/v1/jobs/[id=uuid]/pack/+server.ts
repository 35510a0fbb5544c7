// The job pack PDF for an outside system: the same pack as the job page's download.
import { jobPackQuerySchema } from '$lib/schemas/integration';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { problem } from '$lib/server/http/problem';
import { mediaContext } from '$lib/server/media/context';
import { loadJob } from '$lib/server/jobs/view';
import { boardPhotos, jobPackInputOf } from '$lib/server/jobs/pack-input';
import { renderJobPack } from '$lib/server/jobs/pack/render';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals, params, url }) => {
	const v = requireApi(locals, 'job.read');
	if (v instanceof Response) return v;
	const q = jobPackQuerySchema.safeParse(Object.fromEntries(url.searchParams));
	if (!q.success) return problem(400, 'paper is A4 or Letter.', { errors: { paper: ['paper is A4 or Letter.'] } });
	const db = context().handle.db;
	const view = await loadJob(db, v.organisationId, params.id);
	if (!view) return problem(404, 'No such job in your organisation.');
	const photos = await boardPhotos(db, mediaContext().storage, v.organisationId, view);
	const pdf = await renderJobPack(jobPackInputOf(view, photos, { paper: q.data.paper }));
	return new Response(Buffer.from(pdf), {
		headers: {
			'content-type': 'application/pdf',
			'content-disposition': `attachment; filename="${view.job.reference}-job-pack-${q.data.paper}.pdf"`,
			'content-length': String(pdf.byteLength),
			'cache-control': 'private, no-store'
		}
	});
};
