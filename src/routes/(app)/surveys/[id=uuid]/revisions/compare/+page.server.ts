import { error } from '@sveltejs/kit';
import { compareQuerySchema } from '$lib/schemas/review';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as surveys from '$lib/server/db/surveys';
import { compareStored, listRevisions } from '$lib/server/review/revisions';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const viewer = requirePage(locals, 'survey.read', url);
	const db = context().handle.db;
	const survey = await surveys.get(db, viewer.organisationId, params.id);
	if (!survey) error(404, 'No such survey in your organisation.');
	const all = await listRevisions(db, viewer.organisationId, survey.id);
	const q = compareQuerySchema.safeParse(Object.fromEntries(url.searchParams));
	const numbers = all.map((r) => r.number);
	if (!q.success) {
		if (numbers.length < 2) error(404, 'This survey has fewer than two revisions to compare.');
		return { survey: { id: survey.id, title: survey.title }, numbers, diff: null, error: 'Choose two revisions.' };
	}
	const diff = await compareStored(db, viewer.organisationId, survey.id, q.data.from, q.data.to);
	if (!diff) error(404, 'No such revision of this survey.');
	return { survey: { id: survey.id, title: survey.title }, numbers, diff, error: null };
};
