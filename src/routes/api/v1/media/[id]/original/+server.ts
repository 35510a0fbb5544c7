import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { getMediaRow } from '$lib/server/db/media';
import { mediaContext } from '$lib/server/media/context';
import { serveVariant } from '$lib/server/media/serve';
import { isUuid, notFound } from '$lib/server/register/api';
import type { RequestHandler } from './$types';

/** The file exactly as uploaded: only ever a download (Content-Disposition: attachment), never shown inline. */
export const GET: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'register.read');
	if (v instanceof Response) return v;
	const row = isUuid(params.id) ? await getMediaRow(context().handle.db, v.organisationId, params.id) : undefined;
	if (!row) return notFound('media');
	return serveVariant(mediaContext().storage, row, 'original', request);
};
