import { fail, redirect } from '@sveltejs/kit';
import { readSurveyPlan } from '$lib/schemas/survey';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { record } from '$lib/server/db/audit';
import * as members from '$lib/server/db/members';
import { listSites } from '$lib/server/db/register';
import { machinesBySite } from '$lib/server/db/survey-progress';
import * as surveys from '$lib/server/db/surveys';
import type { SurveyAssigneeRole } from '$lib/server/db/types';
import type { Actions, PageServerLoad } from './$types';

const invalid = (values: Record<string, unknown>, errors: Record<string, string>) => fail(400, { values, errors });

export const load: PageServerLoad = async ({ locals, url }) => {
	const viewer = requirePage(locals, 'survey.plan', url);
	const db = context().handle.db;
	const [sites, machines, people] = await Promise.all([
		listSites(db, viewer.organisationId, { archived: 'live', perPage: 500 }),
		machinesBySite(db, viewer.organisationId),
		members.list(db, viewer.organisationId)
	]);
	return {
		sites: sites.items.map((s) => ({ id: s.id, name: s.name })),
		machines: machines.map((m) => ({
			id: m.id,
			siteId: m.site_id,
			name: m.name,
			tag: m.tag,
			kind: m.kind,
			area: m.area_name,
			hazardous: m.hazardous_area
		})),
		engineers: people
			.filter((p) => p.role === 'engineer' || p.role === 'admin')
			.map((p) => ({ id: p.user_id, name: p.name, role: p.role })),
		technicians: people.filter((p) => p.role !== 'viewer').map((p) => ({ id: p.user_id, name: p.name, role: p.role })),
		me: viewer.userId,
		presetSite: url.searchParams.get('site') ?? ''
	};
};

export const actions: Actions = {
	default: async ({ locals, request, url }) => {
		const viewer = requirePage(locals, 'survey.plan', url);
		const form = readSurveyPlan(await request.formData());
		if (!form.ok) return invalid(form.values, form.errors);
		const { data } = form;
		const db = context().handle.db;
		const people = new Map((await members.list(db, viewer.organisationId)).map((m) => [m.user_id, m.role]));
		const errors: Record<string, string> = {};
		if (data.engineerId && !['engineer', 'admin'].includes(people.get(data.engineerId) ?? '')) {
			errors.engineerId = 'Choose an engineer of your organisation.';
		}
		if (data.technicianIds.some((id) => !people.has(id) || people.get(id) === 'viewer')) {
			errors.technicianIds = 'Choose technicians among the members who can walk the site.';
		}
		if (data.engineerId && data.technicianIds.includes(data.engineerId)) {
			errors.technicianIds = 'The engineer is already assigned; leave them out of the technicians.';
		}
		if (Object.keys(errors).length) return invalid(form.values, errors);
		const assignees: Array<{ userId: string; role: SurveyAssigneeRole }> = [
			...(data.engineerId ? [{ userId: data.engineerId, role: 'engineer' as const }] : []),
			...data.technicianIds.map((userId) => ({ userId, role: 'technician' as const }))
		];
		let created: { id: string } | null;
		try {
			created = await surveys.create(db, viewer.organisationId, viewer.userId, {
				siteId: data.siteId,
				title: data.title,
				plannedDate: data.plannedDate,
				notes: data.notes,
				machineIds: data.machineIds,
				assignees
			});
		} catch (e) {
			if (e instanceof surveys.SurveyRuleError) return invalid(form.values, { machineIds: e.message });
			throw e;
		}
		if (!created) return invalid(form.values, { siteId: 'Choose one of your organisation’s live sites.' });
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'survey.planned',
			subjectType: 'survey',
			subjectId: created.id,
			data: { machines: data.machineIds.length, assignees: assignees.length }
		});
		redirect(303, `/surveys/${created.id}`);
	}
};
