import { error, fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { boardCreateSchema, readSurveyPlan } from '$lib/schemas/survey';
import { requirePage } from '$lib/server/auth/require';
import { can } from '$lib/server/auth/guard';
import { context } from '$lib/server/context';
import { record } from '$lib/server/db/audit';
import * as boards from '$lib/server/db/boards';
import * as members from '$lib/server/db/members';
import { machinesBySite, mediaForMachines } from '$lib/server/db/survey-progress';
import * as surveys from '$lib/server/db/surveys';
import type { SurveyAssigneeRole } from '$lib/server/db/types';
import { mediaContext } from '$lib/server/media/context';
import { MediaError } from '$lib/server/media/process';
import { storeUpload } from '$lib/server/media/service';
import { RegisterError } from '$lib/server/db/register';
import { availableTransitions, isTransitionName, SURVEY_STATUS_LABEL, SURVEY_STATUS_TONE, TRANSITIONS } from '$lib/survey/states';
import { surveyTodo } from '$lib/survey/todo';
import { transitionSurvey, listTransitions, WorkflowError } from '$lib/server/review/workflow';
import { surveyOpenItems } from '$lib/server/review/open-items';
import { listRevisions } from '$lib/server/review/revisions';
import { dateText, jobReference, listJobs } from '$lib/server/jobs/repository';
import { listThreads, mentionableMembers } from '$lib/server/review/comments';
import { boardAccess, isSettled } from '$lib/survey/board-access';
import type { Role, SurveyStatus } from '$lib/server/db/types';
import type { Actions, PageServerLoad } from './$types';

const uploadFail = (status: number, error: string, machineId: string | null = null) =>
	fail(status, { action: 'upload' as const, error, machineId });
const planFail = (values: Record<string, unknown>, errors: Record<string, string>) =>
	fail(400, { action: 'plan' as const, values, errors });

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const viewer = requirePage(locals, 'survey.read', url);
	const db = context().handle.db;
	const survey = await surveys.get(db, viewer.organisationId, params.id);
	if (!survey) error(404, 'No such survey in your organisation.');
	const canPlan = can(viewer.role, 'survey.plan');
	const [machines, assignees, boardRows, siteMachines, people, openItems, history, revisions, threads, mentionable] = await Promise.all([
		surveys.listMachines(db, viewer.organisationId, survey.id),
		surveys.listAssignees(db, viewer.organisationId, survey.id),
		boards.listForSurvey(db, viewer.organisationId, survey.id),
		canPlan ? machinesBySite(db, viewer.organisationId) : Promise.resolve([]),
		canPlan ? members.list(db, viewer.organisationId) : Promise.resolve([]),
		surveyOpenItems(db, viewer.organisationId, survey.id),
		listTransitions(db, viewer.organisationId, survey.id),
		listRevisions(db, viewer.organisationId, survey.id),
		listThreads(db, viewer.organisationId, survey.id, { targetKind: 'survey' }),
		mentionableMembers(db, viewer.organisationId)
	]);
	const jobs = await listJobs(db, viewer.organisationId, { surveyId: survey.id });
	const media = await mediaForMachines(
		db,
		viewer.organisationId,
		machines.map((m) => m.id)
	);
	const open = !isSettled(survey.status) && !survey.archived_at;
	const machineList = machines.map((m) => ({
		id: m.id,
		name: m.name,
		tag: m.tag,
		kind: m.kind,
		hazardous: m.hazardous_area,
		media: media.filter((x) => x.machineId === m.id),
		boards: boardRows
			.filter((b) => b.machine_id === m.id)
			.map((b) => ({
				id: b.id,
				title: b.title,
				mediaId: b.media_id,
				// Read-only for this reader (the board-access policy), shown on the button.
				frozen: boardAccess({
					role: viewer.role,
					surveyStatus: survey.status,
					frozen: b.frozen_at !== null,
					archived: survey.archived_at !== null,
					sessionLive: true
				}).readOnly
			}))
	}));
	const planLines: string[] = [];
	if (machineList.length === 0) planLines.push('Pick the machines to walk (edit the plan below).');
	if (!assignees.some((a) => a.role === 'technician')) planLines.push('Assign at least one technician to walk the site.');
	if (!assignees.some((a) => a.role === 'engineer')) planLines.push('Assign the engineer who reviews and approves.');
	for (const m of machineList) {
		if (m.media.length === 0) planLines.push(`${m.name}: take a photo or add a drawing, then open its board.`);
		else if (m.boards.length === 0) planLines.push(`${m.name}: open a board on one of its photos and mark the points.`);
	}
	const lastChanges = [...history].reverse().find((h) => h.transition === 'request_changes');
	const left = surveyTodo({
		role: viewer.role,
		status: survey.status,
		archived: survey.archived_at !== null,
		planLines,
		boards: openItems,
		changesReason: survey.status === 'changes_requested' ? (lastChanges?.note ?? null) : null
	});
	const exceptions = openItems.flatMap((b) => [
		...b.undecided.map((p) => ({ board: b.title, label: p.label, status: p.status })),
		...b.rejected.map((p) => ({ board: b.title, label: p.label, status: 'rejected' }))
	]);
	return {
		survey: {
			id: survey.id,
			title: survey.title,
			siteId: survey.site_id,
			siteName: survey.site_name,
			status: survey.status,
			statusLabel: SURVEY_STATUS_LABEL[survey.status],
			statusTone: SURVEY_STATUS_TONE[survey.status],
			plannedDate: survey.planned_date,
			notes: survey.notes,
			archived: survey.archived_at !== null
		},
		machines: machineList,
		assignees: assignees.map((a) => ({ userId: a.user_id, name: a.name, role: a.role })),
		left,
		open,
		canPlan: canPlan && open,
		canBoard: mayChangeBoards(viewer.role, survey),
		canUpload: can(viewer.role, 'media.upload') && mayChangeBoards(viewer.role, survey),
		transitions: availableTransitions(viewer.role, survey.status, survey.archived_at !== null)
			.filter((t) => t.name !== 'issue_jobs')
			.map((t) => ({
				name: t.name,
				label: t.label,
				note: t.note
			})),
		canIssueJobs: availableTransitions(viewer.role, survey.status, survey.archived_at !== null).some((t) => t.name === 'issue_jobs'),
		jobs: jobs.map((j) => ({
			id: j.id,
			reference: jobReference(j.number),
			title: j.title,
			status: j.status,
			assignee: j.assignee_name,
			due: dateText(j.due_date),
			recorded: Number(j.recorded),
			points: Number(j.points)
		})),
		exceptions,
		history: history.map((h) => ({
			id: h.id,
			who: h.actor_name ?? 'A former member',
			role: h.actor_role,
			what: TRANSITIONS[h.transition]?.done ?? h.transition,
			from: SURVEY_STATUS_LABEL[h.from_status] ?? h.from_status,
			to: SURVEY_STATUS_LABEL[h.to_status] ?? h.to_status,
			note: h.note,
			at: new Date(h.created_at).toISOString()
		})),
		revisions: revisions.map((r) => ({
			number: r.number,
			approvedAt: new Date(r.approved_at).toISOString(),
			approver: r.approver_name ?? 'A former member',
			note: r.note,
			exceptions: Array.isArray(r.confirmed_exceptions) ? r.confirmed_exceptions.length : 0
		})),
		comments: { threads, members: mentionable, canWrite: can(viewer.role, 'comment.write'), viewerId: viewer.userId },
		plan: canPlan
			? {
					machines: siteMachines
						.filter((m) => m.site_id === survey.site_id)
						.map((m) => ({ id: m.id, name: m.name, tag: m.tag, kind: m.kind, area: m.area_name, hazardous: m.hazardous_area })),
					engineers: people
						.filter((p) => p.role === 'engineer' || p.role === 'admin')
						.map((p) => ({ id: p.user_id, name: p.name, role: p.role })),
					technicians: people.filter((p) => p.role !== 'viewer').map((p) => ({ id: p.user_id, name: p.name, role: p.role }))
				}
			: null
	};
};

async function openBoard(viewerOrg: string, surveyId: string, machineId: string, mediaId: string | null, title: string) {
	const db = context().handle.db;
	return boards.create(db, viewerOrg, { surveyId, machineId, mediaId, title });
}

const uploadFields = z.object({
	machineId: z.uuid({ error: 'Choose the machine.' }),
	kind: z.enum(['photo', 'drawing'], { error: 'Choose photo or drawing.' }),
	caption: z.string().trim().max(300, 'A caption has at most 300 characters.')
});

export const actions: Actions = {
	board: async ({ locals, params, request, url }) => {
		const viewer = requirePage(locals, 'board.write', url);
		const fd = await request.formData();
		const parsed = boardCreateSchema.safeParse({
			machineId: fd.get('machineId') ?? '',
			mediaId: fd.get('mediaId') ?? '',
			title: fd.get('title') ?? ''
		});
		if (!parsed.success) return fail(400, { action: 'board' as const, error: parsed.error.issues[0]?.message ?? 'Choose a photo.' });
		const db = context().handle.db;
		const survey = await surveys.get(db, viewer.organisationId, params.id);
		if (!survey) error(404, 'No such survey in your organisation.');
		if (!mayChangeBoards(viewer.role, survey))
			return fail(409, { action: 'board' as const, error: boardsClosedReason(viewer.role, survey) });
		const title = parsed.data.title || (await defaultTitle(viewer.organisationId, parsed.data.mediaId));
		let created: { id: string } | null;
		try {
			created = await openBoard(viewer.organisationId, survey.id, parsed.data.machineId, parsed.data.mediaId, title);
		} catch (e) {
			if (e instanceof boards.BoardRuleError) return fail(409, { action: 'board' as const, error: e.message });
			throw e;
		}
		if (!created) error(404, 'No such survey in your organisation.');
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'board.created',
			subjectType: 'board',
			subjectId: created.id,
			data: { surveyId: survey.id }
		});
		redirect(303, `/surveys/${survey.id}/boards/${created.id}`);
	},

	upload: async ({ locals, params, request, url }) => {
		const viewer = requirePage(locals, 'media.upload', url);
		const db = context().handle.db;
		const survey = await surveys.get(db, viewer.organisationId, params.id);
		if (!survey) error(404, 'No such survey in your organisation.');
		if (!mayChangeBoards(viewer.role, survey)) return uploadFail(409, boardsClosedReason(viewer.role, survey));
		let fd: FormData;
		try {
			fd = await request.formData();
		} catch {
			return uploadFail(400, 'The upload could not be read (was it cut short?). Try again.');
		}
		const fields = uploadFields.safeParse({
			machineId: fd.get('machineId') ?? '',
			kind: fd.get('kind') ?? 'photo',
			caption: fd.get('caption') ?? ''
		});
		if (!fields.success) return uploadFail(400, fields.error.issues[0]?.message ?? 'Check the fields.');
		const file = fd.get('file');
		if (!(file instanceof File) || file.size === 0) return uploadFail(400, 'Choose or take a photo first.', fields.data.machineId);
		const inSurvey = (await surveys.listMachines(db, viewer.organisationId, survey.id)).some((m) => m.id === fields.data.machineId);
		if (!inSurvey) return uploadFail(400, 'That machine is not part of this survey.');
		const { storage, limits } = mediaContext();
		let row: { id: string; caption: string; kind: string };
		try {
			row = await storeUpload(db, storage, limits, {
				organisationId: viewer.organisationId,
				machineId: fields.data.machineId,
				userId: viewer.userId,
				kind: fields.data.kind,
				caption: fields.data.caption,
				filename: file.name,
				bytes: Buffer.from(await file.arrayBuffer())
			});
		} catch (e) {
			if (e instanceof MediaError || e instanceof RegisterError) return uploadFail(e.status, e.message, fields.data.machineId);
			throw e;
		}
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'media.uploaded',
			subjectType: 'media',
			subjectId: row.id,
			data: { machineId: fields.data.machineId, surveyId: survey.id }
		});
		if (!can(viewer.role, 'board.write') || fd.get('open') !== '1')
			return { action: 'upload' as const, uploaded: row.id, machineId: fields.data.machineId, error: null };
		const title = row.caption || (await defaultTitle(viewer.organisationId, row.id));
		let created: { id: string } | null;
		try {
			created = await openBoard(viewer.organisationId, survey.id, fields.data.machineId, row.id, title);
		} catch (e) {
			if (e instanceof boards.BoardRuleError) return uploadFail(409, e.message);
			throw e;
		}
		if (!created) error(404, 'No such survey in your organisation.');
		redirect(303, `/surveys/${survey.id}/boards/${created.id}`);
	},

	plan: async ({ locals, params, request, url }) => {
		const viewer = requirePage(locals, 'survey.plan', url);
		const db = context().handle.db;
		const survey = await surveys.get(db, viewer.organisationId, params.id);
		if (!survey) error(404, 'No such survey in your organisation.');
		const fd = await request.formData();
		fd.set('siteId', survey.site_id);
		const form = readSurveyPlan(fd);
		if (!form.ok) return planFail(form.values, form.errors);
		const { data } = form;
		const people = new Map((await members.list(db, viewer.organisationId)).map((m) => [m.user_id, m.role]));
		if (data.engineerId && !['engineer', 'admin'].includes(people.get(data.engineerId) ?? '')) {
			return planFail(form.values, { engineerId: 'Choose an engineer of your organisation.' });
		}
		if (data.engineerId && data.technicianIds.includes(data.engineerId)) {
			return planFail(form.values, { technicianIds: 'The engineer is already assigned; leave them out of the technicians.' });
		}
		if (data.technicianIds.some((id) => !people.has(id) || people.get(id) === 'viewer')) {
			return planFail(form.values, { technicianIds: 'Choose technicians among the members who can walk the site.' });
		}
		const assignees: Array<{ userId: string; role: SurveyAssigneeRole }> = [
			...(data.engineerId ? [{ userId: data.engineerId, role: 'engineer' as const }] : []),
			...data.technicianIds.map((userId) => ({ userId, role: 'technician' as const }))
		];
		try {
			await surveys.replacePlan(db, viewer.organisationId, survey.id, {
				title: data.title,
				plannedDate: data.plannedDate,
				notes: data.notes,
				machineIds: data.machineIds,
				assignees
			});
		} catch (e) {
			if (e instanceof surveys.SurveyRuleError) return planFail(form.values, { machineIds: e.message });
			throw e;
		}
		await record(db, {
			organisationId: viewer.organisationId,
			actorUserId: viewer.userId,
			action: 'survey.plan-changed',
			subjectType: 'survey',
			subjectId: survey.id
		});
		return { action: 'plan' as const, saved: true };
	},

	transition: async ({ locals, params, request, url }) => {
		const viewer = requirePage(locals, 'survey.read', url);
		const fd = await request.formData();
		const name = fd.get('name');
		const note = String(fd.get('note') ?? '');
		if (!isTransitionName(name))
			return fail(400, { action: 'transition' as const, error: 'Choose what to do with the survey.', name: null, note });
		const db = context().handle.db;
		try {
			await transitionSurvey(db, {
				organisationId: viewer.organisationId,
				surveyId: params.id,
				name,
				actor: { userId: viewer.userId, role: viewer.role },
				note,
				confirmExceptions: fd.get('confirm') === '1'
			});
		} catch (e) {
			if (e instanceof WorkflowError) {
				if (e.status === 404) error(404, e.message);
				return fail(e.status, {
					action: 'transition' as const,
					error: e.message,
					name,
					note,
					needsConfirmation: Boolean(e.exceptions?.length)
				});
			}
			throw e;
		}
		return { action: 'transition' as const, done: name };
	}
};

/** New boards and photos follow the board-access policy: not while a technician's survey is under review. */
function mayChangeBoards(role: Role, survey: { status: SurveyStatus; archived_at: unknown }) {
	return !boardAccess({ role, surveyStatus: survey.status, frozen: false, archived: survey.archived_at !== null, sessionLive: true })
		.readOnly;
}
function boardsClosedReason(role: Role, survey: { status: SurveyStatus; archived_at: unknown }) {
	return (
		boardAccess({ role, surveyStatus: survey.status, frozen: false, archived: survey.archived_at !== null, sessionLive: true }).reason ?? ''
	);
}

async function defaultTitle(organisationId: string, mediaId: string | null): Promise<string> {
	if (!mediaId) return 'Sketch board';
	const db = context().handle.db;
	const m = await db
		.selectFrom('media')
		.select(['kind', 'caption', 'created_at'])
		.where('organisation_id', '=', organisationId)
		.where('id', '=', mediaId)
		.executeTakeFirst();
	if (!m) return 'Board';
	if (m.caption) return m.caption;
	return `${m.kind === 'drawing' ? 'Drawing' : 'Photo'} of ${new Date(m.created_at).toISOString().slice(0, 10)}`;
}
