import { mediaUpdateSchema } from '$lib/schemas/register';
import { requireApi } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import * as media from '$lib/server/db/media';
import { json, problem, readJson } from '$lib/server/http/problem';
import { audit, isUuid, notFound } from '$lib/server/register/api';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'register.read');
	if (v instanceof Response) return v;
	const row = isUuid(params.id) ? await media.getMedia(context().handle.db, v.organisationId, params.id) : null;
	return row ? json(row) : notFound('media');
};

export const PATCH: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'media.upload');
	if (v instanceof Response) return v;
	if (!isUuid(params.id)) return notFound('media');
	const body = await readJson(request, mediaUpdateSchema);
	if (!body.ok) return body.response;
	const db = context().handle.db;
	const row = await media.updateMedia(db, v.organisationId, params.id, body.data);
	if (!row) return notFound('media');
	await audit(db, v, 'media.updated', 'media', params.id, { fields: Object.keys(body.data) });
	return json(row);
};

/** Archive: engineers and admins any; a technician the photos they uploaded themselves. */
export const DELETE: RequestHandler = async ({ locals, params }) => {
	const v = requireApi(locals, 'media.upload');
	if (v instanceof Response) return v;
	if (!isUuid(params.id)) return notFound('media');
	const db = context().handle.db;
	const current = await media.getMedia(db, v.organisationId, params.id);
	if (!current) return notFound('media');
	if (!can(v.role, 'register.write') && current.uploadedBy !== v.userId) {
		return problem(403, 'You can archive the photos you uploaded; ask an engineer to archive this one.');
	}
	const row = await media.archiveMedia(db, v.organisationId, params.id);
	await audit(db, v, 'media.archived', 'media', params.id);
	return json(row);
};
