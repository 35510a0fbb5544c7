import { error, fail, redirect } from '@sveltejs/kit';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as surveys from '$lib/server/db/surveys';
import { approvedPointsOfLatestRevision, assignableMembers } from '$lib/server/jobs/repository';
import { issueJobs, JobError } from '$lib/server/jobs/service';
import { issueJobsSchema } from '$lib/schemas/job';
import type { Actions, PageServerLoad } from './$types';

/** Form fields of job slot `i` (1-based); points choose their slot in `job:<revisionBoardId>/<pointId>`. */
const JOB_FIELDS = ['title', 'assigneeUserId', 'outageStart', 'outageEnd', 'dueDate', 'notes'] as const;

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const viewer = requirePage(locals, 'job.issue', url);
	const db = context().handle.db;
	const survey = await surveys.get(db, viewer.organisationId, params.id);
	if (!survey) error(404, 'No such survey in your organisation.');
	const [latest, people, assignees] = await Promise.all([
		approvedPointsOfLatestRevision(db, viewer.organisationId, survey.id),
		assignableMembers(db, viewer.organisationId),
		surveys.listAssignees(db, viewer.organisationId, survey.id)
	]);
	const machines = [...new Set((latest?.points ?? []).map((p) => p.machine_id))];
	const technician = assignees.find((a) => a.role === 'technician')?.user_id ?? '';
	return {
		survey: { id: survey.id, title: survey.title, status: survey.status, site: survey.site_name },
		ready: survey.status === 'approved' && !survey.archived_at && latest !== null,
		revision: latest?.revision.number ?? null,
		points: (latest?.points ?? []).map((p) => ({
			key: `${p.revision_board_id}/${p.point_id}`,
			label: p.label,
			component: p.component,
			machine: p.machine_tag ? `${p.machine_name} (${p.machine_tag})` : p.machine_name,
			board: p.board_title,
			mounting: p.mounting,
			worst: p.worst,
			slot: machines.indexOf(p.machine_id) + 1
		})),
		slots: machines.length,
		people: people.map((p) => ({ value: p.id, label: `${p.name} (${p.role})` })),
		defaultAssignee: technician
	};
};

export const actions: Actions = {
	default: async ({ locals, params, request, url }) => {
		const viewer = requirePage(locals, 'job.issue', url);
		const ctx = context();
		const form = await request.formData();
		const values: Record<string, string> = {};
		for (const [k, v] of form.entries()) if (typeof v === 'string') values[k] = v;
		const revision = Number(values.revision);
		// Slots in use, in slot order; each becomes one job.
		const slots = new Map<number, Array<{ revisionBoardId: string; pointId: string }>>();
		for (const [k, v] of Object.entries(values)) {
			if (!k.startsWith('job:')) continue;
			const [revisionBoardId, ...rest] = k.slice(4).split('/');
			const slot = Number(v);
			if (!Number.isInteger(slot) || slot < 1 || slot > 500) return fail(400, { values, errors: { _: 'Choose a job for every point.' } });
			if (!slots.has(slot)) slots.set(slot, []);
			slots.get(slot)!.push({ revisionBoardId, pointId: rest.join('/') });
		}
		const order = [...slots.keys()].sort((a, b) => a - b);
		const raw = {
			revision,
			note: values.note ?? '',
			jobs: order.map((i) => ({
				...Object.fromEntries(JOB_FIELDS.map((f) => [f, values[`${f}.${i}`] ?? ''])),
				lockoutRequested: values[`lockout.${i}`] === 'on',
				points: slots.get(i)!
			}))
		};
		const parsed = issueJobsSchema.safeParse(raw);
		if (!parsed.success) {
			const errors: Record<string, string> = {};
			for (const issue of parsed.error.issues) {
				const [top, idx, field] = issue.path;
				const key = top === 'jobs' && typeof idx === 'number' && field ? `${String(field)}.${order[idx]}` : '_';
				errors[key] ??= issue.message;
			}
			return fail(400, { values, errors });
		}
		try {
			await issueJobs(
				ctx.handle.db,
				{ mailer: ctx.mailer, origin: ctx.config.origin },
				viewer.organisationId,
				params.id,
				{ userId: viewer.userId, role: viewer.role },
				parsed.data
			);
		} catch (e) {
			if (e instanceof JobError) {
				if (e.status === 404) error(404, e.message);
				const m = /^jobs\.(\d+)\.(\w+)$/.exec(e.field ?? '');
				const key = m ? `${m[2]}.${order[Number(m[1])]}` : '_';
				return fail(e.status, { values, errors: { [key]: e.message } });
			}
			throw e;
		}
		redirect(303, `/surveys/${params.id}?jobs=issued`);
	}
};
