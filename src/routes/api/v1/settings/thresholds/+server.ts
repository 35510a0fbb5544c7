import { z } from 'zod';
import { DEFAULT_THRESHOLDS, THRESHOLD_META } from '$lib/trade';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { getThresholds, resetThresholds, saveThresholds, type OrganisationThresholds } from '$lib/server/db/thresholds';
import { json, problem, readJson } from '$lib/server/http/problem';
import type { RequestHandler } from './$types';

function body(t: OrganisationThresholds) {
	return {
		effective: t.effective,
		overrides: t.overrides,
		defaults: DEFAULT_THRESHOLDS,
		issues: t.issues,
		fields: THRESHOLD_META.map(({ key, label, unit, default: def, min, max, firmness, source }) => ({
			key,
			label,
			unit,
			default: def,
			min,
			max,
			firmness,
			source
		}))
	};
}

export const GET: RequestHandler = async ({ locals }) => {
	const v = requireApi(locals, 'thresholds.read');
	if (v instanceof Response) return v;
	return json(body(await getThresholds(context().handle.db, v.organisationId)));
};

/** Replaces the overrides: the body is { key: number } for each value that should differ from its default. */
export const PUT: RequestHandler = async ({ locals, request }) => {
	const v = requireApi(locals, 'thresholds.edit');
	if (v instanceof Response) return v;
	const read = await readJson(request, z.record(z.string(), z.unknown(), { error: 'Send the thresholds as a JSON object.' }), 20_000);
	if (!read.ok) return read.response;
	const db = context().handle.db;
	const saved = await saveThresholds(db, v.organisationId, read.data, { userId: v.userId });
	if (!saved.ok) {
		return problem(400, 'Some thresholds are invalid; nothing was saved.', {
			title: 'Invalid input',
			errors: saved.errors as Record<string, string[]>
		});
	}
	return json(body(saved));
};

/** Back to the defaults: removes every override. */
export const DELETE: RequestHandler = async ({ locals }) => {
	const v = requireApi(locals, 'thresholds.edit');
	if (v instanceof Response) return v;
	return json(body(await resetThresholds(context().handle.db, v.organisationId, { userId: v.userId })));
};
