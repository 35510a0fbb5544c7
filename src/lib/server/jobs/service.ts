// Installation jobs: issuing them from the approved revision (one transaction with the survey's
// move to "jobs issued", then the assignees' e-mail), recording a point as installed (findings
// recomputed here from the same pure function the form uses), and closing a job.
import { sql } from 'kysely';
import type { DB } from '../db/index';
import type { Role } from '../db/types';
import type { Mailer } from '../mail/mailer';
import { can } from '../auth/guard';
import { record as audit } from '../db/audit';
import { getThresholds } from '../db/thresholds';
import { getMediaRow } from '../db/media';
import { transitionSurveyIn, WorkflowError } from '../review/workflow';
import { evaluateInstalled } from '../../trade/evaluate-install';
import { lockoutRequired } from '../../trade/job-plan';
import { MOUNTINGS, type Mounting } from '../../trade/evaluate-point';
import { checkClose, type CloseBlocker } from '../../jobs/closing';
import type { IssueJobsInput, RecordPointInput } from '../../schemas/job';
import { approvedPointsOfLatestRevision, jobReference } from './repository';
import { emitEvent } from '../integration/webhooks';

export class JobError extends Error {
	constructor(
		readonly status: 400 | 403 | 404 | 409,
		message: string,
		readonly field?: string,
		readonly blockers?: CloseBlocker[]
	) {
		super(message);
	}
}

export interface Actor {
	userId: string;
	role: Role;
}

export interface IssueMail {
	mailer: Mailer;
	origin: string;
}

const isMounting = (v: unknown): v is Mounting => (MOUNTINGS as readonly unknown[]).includes(v);

/**
 * Issues the jobs of an approved survey from its latest revision. Every approved point goes in
 * exactly one job; the survey moves to "jobs issued" in the same transaction. Each assignee gets
 * one e-mail per job once the transaction has committed.
 */
export async function issueJobs(
	db: DB,
	mail: IssueMail | null,
	organisationId: string,
	surveyId: string,
	actor: Actor,
	input: IssueJobsInput
) {
	if (!can(actor.role, 'job.issue')) throw new JobError(403, 'Your role cannot issue jobs.');
	const created = await db.transaction().execute(async (trx) => {
		const survey = await trx
			.selectFrom('survey')
			.select(['id', 'title', 'status', 'archived_at'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', surveyId)
			.forUpdate()
			.executeTakeFirst();
		if (!survey) throw new JobError(404, 'No such survey in your organisation.');
		const latest = await approvedPointsOfLatestRevision(trx, organisationId, surveyId);
		if (!latest || survey.status !== 'approved') {
			throw new JobError(409, 'Jobs are issued from an approved survey; this one is not approved (or its jobs are issued already).');
		}
		if (latest.revision.number !== input.revision) {
			throw new JobError(409, `The survey now has revision ${latest.revision.number}; reload the page and issue from it.`);
		}
		const byKey = new Map(latest.points.map((p) => [`${p.revision_board_id}/${p.point_id}`, p]));
		const seen = new Set<string>();
		for (const [i, j] of input.jobs.entries()) {
			for (const p of j.points) {
				const key = `${p.revisionBoardId}/${p.pointId}`;
				if (!byKey.has(key))
					throw new JobError(400, `Job ${i + 1}: a point is not an approved point of revision ${input.revision}.`, 'jobs');
				if (seen.has(key)) throw new JobError(400, `Point ${byKey.get(key)!.label} is in two jobs; put it in one.`, 'jobs');
				if (byKey.get(key)!.job_id) throw new JobError(409, `Point ${byKey.get(key)!.label} is in a job already.`, 'jobs');
				seen.add(key);
			}
		}
		const missing = latest.points.filter((p) => !seen.has(`${p.revision_board_id}/${p.point_id}`));
		if (missing.length) {
			throw new JobError(
				400,
				`Every approved point goes in a job: ${missing.map((p) => p.label).join(', ')} ${missing.length === 1 ? 'is' : 'are'} left out.`,
				'jobs'
			);
		}
		const assignable = new Map(
			(
				await trx
					.selectFrom('member')
					.innerJoin('app_user', 'app_user.id', 'member.user_id')
					.select(['app_user.id', 'app_user.name', 'app_user.email', 'member.role'])
					.where('member.organisation_id', '=', organisationId)
					.execute()
			)
				.filter((m) => can(m.role, 'job.record'))
				.map((m) => [m.id, m])
		);
		for (const [i, j] of input.jobs.entries()) {
			if (j.assigneeUserId && !assignable.has(j.assigneeUserId)) {
				throw new JobError(400, `Job ${i + 1}: choose a member who may carry out jobs.`, `jobs.${i}.assigneeUserId`);
			}
		}

		// Job numbers run per organisation; the lock keeps two issuers from taking the same one.
		await sql`select pg_advisory_xact_lock(hashtext(${`installation_job:${organisationId}`}))`.execute(trx);
		const last = await trx
			.selectFrom('installation_job')
			.select((eb) => eb.fn.max('number').as('n'))
			.where('organisation_id', '=', organisationId)
			.executeTakeFirst();
		let next = Number(last?.n ?? 0) + 1;
		const now = new Date();
		const out: Array<{ id: string; number: number; title: string; assignee: { name: string; email: string } | null; due: string | null }> =
			[];
		for (const j of input.jobs) {
			const points = j.points.map((p) => byKey.get(`${p.revisionBoardId}/${p.pointId}`)!);
			const machines = [...new Set(points.map((p) => (p.machine_tag ? `${p.machine_name} (${p.machine_tag})` : p.machine_name)))];
			const title = j.title ?? `Install ${points.length} sensor${points.length === 1 ? '' : 's'} on ${machines.join(', ')}`.slice(0, 200);
			const lockout = lockoutRequired(
				points.map((p) => ({ label: p.label, mounting: isMounting(p.mounting) ? p.mounting : null })),
				{ requested: j.lockoutRequested }
			);
			const row = await trx
				.insertInto('installation_job')
				.values({
					organisation_id: organisationId,
					survey_id: surveyId,
					revision_id: latest.revision.id,
					number: next++,
					title,
					assignee_user_id: j.assigneeUserId,
					outage_start: j.outageStart,
					outage_end: j.outageEnd,
					due_date: j.dueDate,
					lockout_required: lockout.required,
					notes: j.notes,
					issued_by: actor.userId,
					issued_at: now,
					updated_at: now
				})
				.returning(['id', 'number'])
				.executeTakeFirstOrThrow();
			await trx
				.insertInto('job_point')
				.values(
					j.points.map((p, k) => ({
						organisation_id: organisationId,
						job_id: row.id,
						revision_board_id: p.revisionBoardId,
						point_id: p.pointId,
						number: k + 1,
						findings: '[]'
					}))
				)
				.execute();
			const a = j.assigneeUserId ? assignable.get(j.assigneeUserId)! : null;
			out.push({ id: row.id, number: row.number, title, assignee: a ? { name: a.name, email: a.email } : null, due: j.dueDate });
		}
		await transitionSurveyIn(trx, { organisationId, surveyId, name: 'issue_jobs', actor, note: input.note }).catch((e) => {
			if (e instanceof WorkflowError) throw new JobError(e.status, e.message);
			throw e;
		});
		await audit(trx, {
			organisationId,
			actorUserId: actor.userId,
			action: 'job.issued',
			subjectType: 'survey',
			subjectId: surveyId,
			data: { revision: input.revision, jobs: out.map((o) => jobReference(o.number)) }
		});
		// Webhooks asking for issued jobs hear of each one when this commits.
		for (const o of out) {
			await emitEvent(trx, organisationId, 'job.issued', {
				job: { id: o.id, reference: jobReference(o.number), title: o.title, due: o.due, assignee: o.assignee?.name ?? null },
				survey: { id: surveyId, title: survey.title },
				revision: { id: latest.revision.id, number: latest.revision.number },
				href: `/api/v1/jobs/${o.id}`
			});
		}
		if (mail) {
			for (const o of out) {
				if (!o.assignee) continue;
				const ref = jobReference(o.number);
				await mail.mailer.queue(trx, {
					purpose: 'job-assigned',
					organisationId,
					to: o.assignee.email,
					subject: `Installation job ${ref}: ${o.title}`,
					text:
						`Hello ${o.assignee.name},\n\nYou have been assigned installation job ${ref}, “${o.title}”, from the survey “${survey.title}”.` +
						`${o.due ? `\nDue: ${o.due}.` : ''}\n\nOpen it (job pack, points, what to record): ${mail.origin}/jobs/${o.id}\n\n` +
						'Stop, isolate and lock out the machine before preparing a seat, drilling or tapping. Local codes and site rules come first.\n'
				});
			}
		}
		return out;
	});
	mail?.mailer.kick();
	return created;
}

/** What the record form sends, with the photo already stored (or not). */
export interface RecordInput extends RecordPointInput {
	/** The photo stored for this recording (through the upload pipeline), if one came with it. */
	uploadedPhotoId?: string | null;
}

/** May this person record on this job? Technicians record the jobs assigned to them (or unassigned ones). */
export function mayRecord(actor: Actor, job: { assignee_user_id: string | null; status: string }): true | JobError {
	if (!can(actor.role, 'job.record')) return new JobError(403, 'Your role cannot record installation work.');
	if (job.status === 'closed') return new JobError(409, 'This job is closed; its record cannot change.');
	if (actor.role === 'technician' && job.assignee_user_id && job.assignee_user_id !== actor.userId) {
		return new JobError(403, 'This job is assigned to someone else; ask the engineer to reassign it.');
	}
	return true;
}

/** The job point a recording is for, checked before a photo is stored for it. */
export async function recordTarget(db: DB, organisationId: string, jobId: string, jobPointId: string, actor: Actor) {
	const job = await db
		.selectFrom('installation_job')
		.select(['id', 'number', 'status', 'assignee_user_id'])
		.where('organisation_id', '=', organisationId)
		.where('id', '=', jobId)
		.executeTakeFirst();
	if (!job) throw new JobError(404, 'No such job in your organisation.');
	const point = await db
		.selectFrom('job_point as jp')
		.innerJoin('revision_point as rp', (j) =>
			j.onRef('rp.revision_board_id', '=', 'jp.revision_board_id').onRef('rp.point_id', '=', 'jp.point_id')
		)
		.innerJoin('revision_board as rb', 'rb.id', 'jp.revision_board_id')
		.select(['jp.id', 'jp.record_key', 'jp.photo_media_id', 'rp.label', 'rp.mounting', 'rb.machine_id'])
		.where('jp.organisation_id', '=', organisationId)
		.where('jp.job_id', '=', jobId)
		.where('jp.id', '=', jobPointId)
		.executeTakeFirst();
	if (!point) throw new JobError(404, 'No such point in this job.');
	const may = mayRecord(actor, job);
	if (may !== true) throw may;
	return { job, point };
}

/**
 * Stores the as-installed record of one point. The findings are computed here from what was
 * sent (the browser shows the same function's answer as it is typed). A record sent again with
 * the same key (an offline retry whose answer was lost) changes nothing.
 */
export async function recordPoint(db: DB, organisationId: string, jobId: string, jobPointId: string, actor: Actor, input: RecordInput) {
	const { point } = await recordTarget(db, organisationId, jobId, jobPointId, actor);
	if (input.recordKey && point.record_key === input.recordKey) return { duplicate: true as const };
	let photo = input.uploadedPhotoId ?? input.photoMediaId ?? point.photo_media_id;
	if (photo && photo !== input.uploadedPhotoId) {
		const m = await getMediaRow(db, organisationId, photo);
		if (!m || m.machine_id !== point.machine_id) throw new JobError(400, 'That photo is not one of this machine’s.', 'photo');
	}
	if (photo === undefined) photo = null;
	const thresholds = (await getThresholds(db, organisationId)).overrides;
	const evaluation = evaluateInstalled(
		{
			mounting: input.mounting,
			torqueNm: input.torqueNm,
			supplyV: input.supplyV,
			polarityOk: input.polarity === null ? null : input.polarity === 'ok',
			plannedMounting: isMounting(point.mounting) ? point.mounting : null,
			readyAt: input.readyAt,
			baselineStartAt: input.baselineStartAt,
			deviation: input.deviation,
			deviationReason: input.deviationReason,
			photo: photo !== null
		},
		thresholds
	);
	await db.transaction().execute(async (trx) => {
		const job = await trx
			.selectFrom('installation_job')
			.select(['status', 'assignee_user_id'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', jobId)
			.forUpdate()
			.executeTakeFirstOrThrow();
		const may = mayRecord(actor, job);
		if (may !== true) throw may;
		await trx
			.updateTable('job_point')
			.set({
				mounting_used: input.mounting,
				torque_nm: input.torqueNm,
				supply_v: input.supplyV,
				polarity_ok: input.polarity === null ? null : input.polarity === 'ok',
				photo_media_id: photo,
				ready_at: input.readyAt ? new Date(input.readyAt) : null,
				baseline_start_at: input.baselineStartAt ? new Date(input.baselineStartAt) : null,
				deviation: input.deviation,
				deviation_reason: input.deviationReason,
				findings: JSON.stringify(evaluation.findings),
				worst: evaluation.worst,
				recorded_by: actor.userId,
				recorded_at: new Date(),
				record_key: input.recordKey
			})
			.where('organisation_id', '=', organisationId)
			.where('id', '=', jobPointId)
			.execute();
		await trx.updateTable('installation_job').set({ updated_at: new Date() }).where('id', '=', jobId).execute();
	});
	return { duplicate: false as const, findings: evaluation.findings, worst: evaluation.worst, photoMediaId: photo };
}

/**
 * Closes a job. Refused (409, with the points in the way) while a point is unrecorded or has a
 * failing finding, unless the engineer records why. Closing the survey's last open job closes
 * the survey too.
 */
export async function closeJob(db: DB, organisationId: string, jobId: string, actor: Actor, note: string) {
	if (!can(actor.role, 'job.close')) throw new JobError(403, 'Your role cannot close jobs.');
	return db.transaction().execute(async (trx) => {
		const job = await trx
			.selectFrom('installation_job')
			.select(['id', 'number', 'status', 'survey_id'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', jobId)
			.forUpdate()
			.executeTakeFirst();
		if (!job) throw new JobError(404, 'No such job in your organisation.');
		if (job.status === 'closed') throw new JobError(409, 'This job is closed already.');
		const points = await trx
			.selectFrom('job_point as jp')
			.innerJoin('revision_point as rp', (j) =>
				j.onRef('rp.revision_board_id', '=', 'jp.revision_board_id').onRef('rp.point_id', '=', 'jp.point_id')
			)
			.select(['rp.label', 'jp.recorded_at', 'jp.worst', 'jp.findings'])
			.where('jp.organisation_id', '=', organisationId)
			.where('jp.job_id', '=', jobId)
			.orderBy('jp.number')
			.execute();
		const check = checkClose(
			points.map((p) => ({
				label: p.label,
				record: p.recorded_at
					? { worst: p.worst, findings: (p.findings ?? []) as Array<{ severity: 'pass' | 'warn' | 'fail'; message: string }> }
					: null
			})),
			note
		);
		if (!check.ok) throw new JobError(409, check.message, 'note', check.blockers);
		const now = new Date();
		await trx
			.updateTable('installation_job')
			.set({ status: 'closed', closed_at: now, closed_by: actor.userId, close_note: note.trim(), updated_at: now })
			.where('id', '=', jobId)
			.execute();
		await audit(trx, {
			organisationId,
			actorUserId: actor.userId,
			action: 'job.closed',
			subjectType: 'installation_job',
			subjectId: jobId,
			data: { reference: jobReference(job.number), note: note.trim(), overridden: check.blockers.map((b) => `${b.label}: ${b.why}`) }
		});
		await emitEvent(trx, organisationId, 'job.closed', {
			job: { id: jobId, reference: jobReference(job.number), closedAt: now.toISOString(), note: note.trim() },
			survey: { id: job.survey_id },
			href: `/api/v1/jobs/${jobId}`
		});
		const open = await trx
			.selectFrom('installation_job')
			.select('id')
			.where('organisation_id', '=', organisationId)
			.where('survey_id', '=', job.survey_id)
			.where('status', '!=', 'closed')
			.executeTakeFirst();
		let surveyClosed = false;
		if (!open) {
			const s = await trx.selectFrom('survey').select(['status', 'archived_at']).where('id', '=', job.survey_id).executeTakeFirstOrThrow();
			if (s.status === 'jobs_issued' && !s.archived_at) {
				await transitionSurveyIn(trx, {
					organisationId,
					surveyId: job.survey_id,
					name: 'close',
					actor,
					note: 'Every installation job is closed.'
				});
				surveyClosed = true;
			}
		}
		return { closedAt: now, surveyClosed, overridden: check.blockers };
	});
}
