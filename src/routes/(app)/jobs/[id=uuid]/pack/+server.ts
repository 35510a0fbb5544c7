// The job pack of one job as a PDF download: ?paper=A4 (default) or Letter.
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
	const paperParam = url.searchParams.get('paper') ?? 'A4';
	const paper = paperParam === 'A4' || paperParam === 'Letter' ? paperParam : null;
	if (!paper) return problem(400, 'paper is A4 or Letter.');
	const db = context().handle.db;
	const view = await loadJob(db, v.organisationId, params.id);
	if (!view) return problem(404, 'No such job in your organisation.');
	const photos = await boardPhotos(db, mediaContext().storage, v.organisationId, view);
	const pdf = await renderJobPack(jobPackInputOf(view, photos, { paper }));
	return new Response(Buffer.from(pdf), {
		headers: {
			'content-type': 'application/pdf',
			'content-disposition': `attachment; filename="${view.job.reference}-job-pack-${paper}.pdf"`,
			'content-length': String(pdf.byteLength),
			'cache-control': 'private, no-store',
			'x-content-type-options': 'nosniff'
		}
	});
};
