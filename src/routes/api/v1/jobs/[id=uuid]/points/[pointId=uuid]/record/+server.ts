// The as-installed record of one job point: multipart/form-data (the record form, online or
// from the device's offline queue) with an optional `photo`, or JSON without one. The photo goes
// through the upload pipeline onto the point's machine; findings are computed here.
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { fieldErrors, json, problem } from '$lib/server/http/problem';
import { mediaContext } from '$lib/server/media/context';
import { MediaError } from '$lib/server/media/process';
import { storeUpload } from '$lib/server/media/service';
import { RegisterError } from '$lib/server/db/register';
import { JobError, recordPoint, recordTarget } from '$lib/server/jobs/service';
import { jobReference } from '$lib/server/jobs/repository';
import { recordPointSchema } from '$lib/schemas/job';
import type { RequestHandler } from './$types';

export const POST: RequestHandler = async ({ locals, params, request }) => {
	const v = requireApi(locals, 'job.record');
	if (v instanceof Response) return v;
	const { storage, limits } = mediaContext();
	const type = request.headers.get('content-type') ?? '';
	const length = Number(request.headers.get('content-length') ?? 0);
	if (length > limits.maxBytes + 256 * 1024) {
		return problem(
			413,
			`The photo is ${(length / 1024 / 1024).toFixed(1)} MB; the limit is ${(limits.maxBytes / 1024 / 1024).toFixed(0)} MB.`
		);
	}
	let raw: Record<string, unknown> = {};
	let photo: File | null = null;
	try {
		if (type.includes('multipart/form-data')) {
			const form = await request.formData();
			for (const [k, val] of form.entries()) if (typeof val === 'string') raw[k] = val;
			const f = form.get('photo');
			if (f instanceof File && f.size > 0) photo = f;
		} else if (type.includes('application/json')) {
			const body = await request.json();
			if (!body || typeof body !== 'object' || Array.isArray(body)) return problem(400, 'Send a JSON object.');
			raw = body as Record<string, unknown>;
		} else {
			return problem(415, 'Send the record as multipart/form-data (with an optional photo) or JSON.');
		}
	} catch {
		return problem(400, 'The record could not be read (was it cut short?). Try again.');
	}
	const parsed = recordPointSchema.safeParse(raw);
	if (!parsed.success) return problem(400, 'Some fields are invalid.', { errors: fieldErrors(parsed.error) });
	const db = context().handle.db;
	const actor = { userId: v.userId, role: v.role };
	try {
		const target = await recordTarget(db, v.organisationId, params.id, params.pointId, actor);
		if (parsed.data.recordKey && target.point.record_key === parsed.data.recordKey) return json({ duplicate: true });
		let uploadedPhotoId: string | null = null;
		if (photo) {
			const row = await storeUpload(db, storage, limits, {
				organisationId: v.organisationId,
				machineId: target.point.machine_id,
				userId: v.userId,
				kind: 'photo',
				caption: `Installed sensor ${target.point.label} (${jobReference(target.job.number)})`,
				filename: photo.name,
				bytes: Buffer.from(await photo.arrayBuffer())
			});
			uploadedPhotoId = row.id;
		}
		const result = await recordPoint(db, v.organisationId, params.id, params.pointId, actor, { ...parsed.data, uploadedPhotoId });
		return json(result);
	} catch (e) {
		if (e instanceof JobError) return problem(e.status, e.message, e.field ? { errors: { [e.field]: [e.message] } } : {});
		if (e instanceof RegisterError) return problem(e.status, e.message);
		if (e instanceof MediaError) return problem(e.status, e.message, { errors: { photo: [e.message] } });
		throw e;
	}
};
