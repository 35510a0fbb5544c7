// Installation jobs: issuing them from an approved revision, the as-installed record of a point,
// closing a job. Shared by the pages, the JSON API and the offline queue of the record form.
import { z } from 'zod';
import { idField, optionalIdField } from './ids';

const blankToNull = (v: unknown) => (v == null || (typeof v === 'string' && v.trim() === '') ? null : v);

const isoDate = z.preprocess(
	blankToNull,
	z
		.string()
		.trim()
		.refine((s) => /^\d{4}-\d{2}-\d{2}$/.test(s) && !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), 'Enter the date as YYYY-MM-DD.')
		.nullable()
);

/** A date and time from a datetime-local field or an ISO 8601 string; blank is none. */
export const dateTimeField = (label: string) =>
	z.preprocess(
		blankToNull,
		z
			.string()
			.trim()
			.max(40)
			.refine((s) => !Number.isNaN(Date.parse(s)), `${label}: enter a date and time.`)
			.transform((s) => new Date(s).toISOString())
			.nullable()
	);

const numberField = (label: string, min: number, max: number, unit: string) =>
	z.preprocess(
		(v) => (blankToNull(v) === null ? null : typeof v === 'string' ? Number(v.trim().replace(',', '.')) : v),
		z
			.number({ error: `${label}: enter a number in ${unit}.` })
			.refine(Number.isFinite, `${label}: enter a number in ${unit}.`)
			.min(min, `${label}: at least ${min} ${unit}.`)
			.max(max, `${label}: at most ${max} ${unit}.`)
			.nullable()
	);

export const jobPointRefSchema = z.object({
	revisionBoardId: idField('A point could not be read; reload the page.'),
	pointId: z.string().trim().min(1).max(100)
});
export type JobPointRef = z.infer<typeof jobPointRefSchema>;

export const JOB_TITLE_MAX = 200;

export const jobDraftSchema = z
	.object({
		title: z.preprocess(blankToNull, z.string().trim().max(JOB_TITLE_MAX, `A title has at most ${JOB_TITLE_MAX} characters.`).nullable()),
		assigneeUserId: z.preprocess(blankToNull, z.string().trim().min(1).max(100).nullable()).default(null),
		outageStart: dateTimeField('Outage start'),
		outageEnd: dateTimeField('Outage end'),
		dueDate: isoDate,
		lockoutRequested: z.boolean().default(false),
		notes: z.string().trim().max(2000, 'Notes have at most 2000 characters.').default(''),
		points: z.array(jobPointRefSchema).min(1, 'A job needs at least one point.').max(500)
	})
	.refine((j) => !j.outageStart || !j.outageEnd || j.outageEnd > j.outageStart, {
		message: 'The outage must end after it starts.',
		path: ['outageEnd']
	});
export type JobDraft = z.infer<typeof jobDraftSchema>;

/** Issuing the jobs of an approved survey (its latest revision). */
export const issueJobsSchema = z.object({
	revision: z.number().int().positive(),
	note: z.string().trim().max(2000).default(''),
	jobs: z.array(jobDraftSchema).min(1, 'Issue at least one job.').max(200)
});
export type IssueJobsInput = z.infer<typeof issueJobsSchema>;

export const MOUNTING_VALUES = ['stud', 'bonded_pad', 'magnet'] as const;

/** What the technician records for one point (the photo travels apart, as a file). */
export const recordPointSchema = z
	.object({
		mounting: z.enum(MOUNTING_VALUES, { error: 'Choose the mounting method used.' }),
		torqueNm: numberField('Torque applied', 0, 200, 'N·m'),
		supplyV: numberField('Supply voltage', 0, 60, 'V'),
		polarity: z.preprocess(blankToNull, z.enum(['ok', 'reversed'], { error: 'Say whether the polarity is right.' }).nullable()),
		readyAt: dateTimeField('Device ready'),
		baselineStartAt: dateTimeField('Baseline start'),
		deviation: z.string().trim().max(2000, 'At most 2000 characters.').default(''),
		deviationReason: z.string().trim().max(2000, 'At most 2000 characters.').default(''),
		/** Chosen by the device per recording, so a retry after a lost answer is stored once. */
		recordKey: z.preprocess(blankToNull, z.string().trim().max(100).nullable()).default(null),
		/** A photo already uploaded for this point (kept when the record is corrected). */
		photoMediaId: optionalIdField('The photo could not be read; take it again.').default(null)
	})
	.refine((r) => r.deviation === '' || r.deviationReason !== '', {
		message: 'Say why the work differs from the plan.',
		path: ['deviationReason']
	});
export type RecordPointInput = z.infer<typeof recordPointSchema>;

export const closeJobSchema = z.object({
	note: z.string().trim().max(2000, 'At most 2000 characters.').default('')
});
export type CloseJobInput = z.infer<typeof closeJobSchema>;

export { isoDate as jobDateField };
