import { mediaListQuerySchema as listQuery, mediaUploadFieldsSchema as fields, queryObject } from '$lib/schemas/register';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as machines from '$lib/server/db/machines';
import * as media from '$lib/server/db/media';
import { json, problem } from '$lib/server/http/problem';
import { mediaContext } from '$lib/server/media/context';
import { storeUpload } from '$lib/server/media/service';
import { audit, errorResponse, isUuid, notFound } from '$lib/server/register/api';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async ({ locals, params, url }) => {
	const v = requireApi(locals, 'register.read');
	if (v instanceof Response) return v;
	const db = context().handle.db;
	if (!isUuid(params.id) || !(await machines.getMachine(db, v.organisationId, params.id))) return notFound('machine');
	const q = listQuery.parse(queryObject(url));
	return json(await media.listMedia(db, v.organisationId, params.id, q));
};

/** multipart/form-data with `file` (JPEG, PNG, WebP or PDF), optional `kind` and `caption`. */
export const POST: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'media.upload');
	if (v instanceof Response) return v;
	if (!isUuid(params.id)) return notFound('machine');
	const { storage, limits } = mediaContext();
	const length = Number(request.headers.get('content-length') ?? 0);
	if (length > limits.maxBytes + 256 * 1024) {
		return problem(
			413,
			`The upload is ${(length / 1024 / 1024).toFixed(1)} MB; the limit is ${(limits.maxBytes / 1024 / 1024).toFixed(0)} MB per file.`
		);
	}
	if (!(request.headers.get('content-type') ?? '').includes('multipart/form-data')) {
		return problem(415, 'Send the file as multipart/form-data in a field named "file".');
	}
	let form: FormData;
	try {
		form = await request.formData();
	} catch {
		return problem(400, 'The upload could not be read (was it cut short?). Try again.');
	}
	const file = form.get('file');
	if (!(file instanceof File)) return problem(400, 'Choose a file to upload.', { errors: { file: ['Choose a file to upload.'] } });
	const parsed = fields.safeParse({ kind: form.get('kind'), caption: form.get('caption') });
	if (!parsed.success) {
		return problem(400, 'Some fields are invalid.', {
			errors: Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), [i.message]]))
		});
	}
	const db = context().handle.db;
	try {
		const row = await storeUpload(db, storage, limits, {
			organisationId: v.organisationId,
			machineId: params.id,
			userId: v.userId,
			kind: parsed.data.kind,
			caption: parsed.data.caption,
			filename: file.name,
			bytes: Buffer.from(await file.arrayBuffer())
		});
		await audit(db, v, 'media.uploaded', 'media', row.id, { machineId: params.id, mimeType: row.mimeType, bytes: row.originalBytes });
		return json(row, { status: 201, headers: { location: `/api/v1/media/${row.id}` } });
	} catch (e) {
		return errorResponse(e);
	}
};
