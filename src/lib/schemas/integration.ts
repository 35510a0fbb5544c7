// The integration API: tokens and webhooks (settings forms), the changes-since feed's query,
// and the shapes the feed and revision endpoints answer with (the OpenAPI document is built
// from these same schemas).
import { z } from 'zod';
import { idField } from './ids';

export const TOKEN_SCOPES = ['read', 'read_write'] as const;
export const TOKEN_KINDS = ['person', 'service'] as const;
export const SERVICE_ROLES = ['engineer', 'technician', 'viewer'] as const;
export const WEBHOOK_EVENTS = ['revision.approved', 'job.issued', 'job.closed'] as const;
export const TOKEN_MAX_DAYS = 730;

export const SCOPE_LABEL: Record<(typeof TOKEN_SCOPES)[number], string> = { read: 'Read only', read_write: 'Read and write' };
export const EVENT_LABEL: Record<(typeof WEBHOOK_EVENTS)[number], string> = {
	'revision.approved': 'Revision approved',
	'job.issued': 'Job issued',
	'job.closed': 'Job closed'
};

const days = z.coerce
	.number({ error: 'Days until the token expires.' })
	.int('Whole days.')
	.min(1, 'At least 1 day.')
	.max(TOKEN_MAX_DAYS, `At most ${TOKEN_MAX_DAYS} days; create a new token after that.`);

/** The admin's form for a new token. A person token acts as a member; a service token as its own named account. */
export const tokenCreateSchema = z.discriminatedUnion('kind', [
	z.object({
		kind: z.literal('person'),
		name: z.string().trim().min(1, 'Say what the token is for.').max(100, 'At most 100 characters.'),
		userId: z.string({ error: 'Choose the member the token acts as.' }).trim().min(1, 'Choose the member the token acts as.').max(200),
		scope: z.enum(TOKEN_SCOPES, { error: 'Choose read or read and write.' }),
		expiresInDays: days
	}),
	z.object({
		kind: z.literal('service'),
		name: z.string().trim().min(1, 'Name the service (e.g. the maintenance system).').max(100, 'At most 100 characters.'),
		role: z.enum(SERVICE_ROLES, { error: 'Choose the role the service acts with.' }),
		scope: z.enum(TOKEN_SCOPES, { error: 'Choose read or read and write.' }),
		expiresInDays: days
	})
]);
export type TokenCreate = z.infer<typeof tokenCreateSchema>;

export const webhookCreateSchema = z.object({
	url: z
		.string({ error: 'The URL deliveries are posted to.' })
		.trim()
		.min(8, 'The URL deliveries are posted to.')
		.max(2000, 'At most 2000 characters.')
		.refine((v) => URL.canParse(v), 'Not a URL.'),
	events: z.array(z.enum(WEBHOOK_EVENTS)).min(1, 'Choose at least one event.'),
	description: z.string().trim().max(200, 'At most 200 characters.').default('')
});

export const rowIdSchema = z.object({ id: idField('Which row?') });

/** ?since=&cursor=&limit= of a changes-since feed. */
export const changesQuerySchema = z.object({
	since: z.iso
		.datetime({ offset: true, error: 'since is an ISO 8601 time with a zone, e.g. 2026-01-31T00:00:00Z.' })
		.optional()
		.describe('Only items changed at or after this time (ISO 8601 with a zone). Omit for everything.'),
	cursor: z
		.string()
		.max(200)
		.optional()
		.describe('The `nextCursor` of the previous page; continues after its last item. Keep `since` the same.'),
	limit: z.coerce.number().int().min(1).max(200).default(50).describe('Items per page (1 to 200).')
});

export const findingSchema = z
	.object({
		rule: z.string().describe('Stable rule id, e.g. seat.flat-diameter'),
		severity: z.enum(['pass', 'warn', 'fail']),
		message: z.string(),
		value: z.number().optional().describe("The measured or computed value, in the rule's unit"),
		limit: z.number().optional().describe('The threshold it was compared with'),
		reference: z.string().optional().describe('Where the rule comes from'),
		field: z.string().optional(),
		missing: z.boolean().optional()
	})
	.describe('One rule finding.');

export const revisionSummarySchema = z.object({
	id: z.uuid(),
	surveyId: z.uuid(),
	surveyTitle: z.string(),
	siteId: z.uuid(),
	number: z.number().int(),
	approvedAt: z.string().describe('ISO 8601'),
	approvedBy: z.string().nullable(),
	approverName: z.string().nullable(),
	note: z.string(),
	pointCount: z.number().int(),
	href: z.string().describe('Path of the revision with its points.')
});

export const revisionFeedSchema = z.object({
	items: z.array(revisionSummarySchema),
	nextCursor: z.string().nullable().describe('Pass as `cursor` for the next page; null on the last page.')
});

export const revisionPointSchema = z.object({
	pointId: z.string(),
	boardId: z.uuid(),
	machineId: z.uuid(),
	label: z.string(),
	component: z.string().nullable(),
	status: z.string(),
	decisionReason: z.string().nullable(),
	direction: z.string().nullable(),
	surface: z.string().nullable(),
	mounting: z.string().nullable(),
	material: z.string().nullable(),
	flatDiameterMm: z.number().nullable(),
	wallThicknessMm: z.number().nullable(),
	distanceToBearingMm: z.number().nullable(),
	surfaceTempC: z.number().nullable(),
	notes: z.string().nullable(),
	x: z.number(),
	y: z.number(),
	worst: z.enum(['pass', 'warn', 'fail']),
	findings: z.array(findingSchema)
});

export const revisionDetailSchema = revisionSummarySchema.extend({
	boards: z.array(z.object({ id: z.uuid(), boardId: z.uuid(), machineId: z.uuid(), title: z.string() })),
	points: z.array(revisionPointSchema)
});

export const jobSummarySchema = z.object({
	id: z.uuid(),
	reference: z.string().describe('J-0001: the number a job is known by on site'),
	title: z.string(),
	status: z.enum(['issued', 'closed']),
	surveyId: z.uuid(),
	surveyTitle: z.string(),
	site: z.string(),
	revisionNumber: z.number().int(),
	assigneeName: z.string().nullable(),
	outageStart: z.string().nullable(),
	outageEnd: z.string().nullable(),
	due: z.string().nullable().describe('YYYY-MM-DD'),
	lockoutRequired: z.boolean(),
	issuedAt: z.string(),
	closedAt: z.string().nullable(),
	updatedAt: z.string().describe('When anything of the job last changed (a record, closing); the feed orders by it.'),
	points: z.number().int(),
	recorded: z.number().int(),
	failing: z.number().int(),
	href: z.string()
});

export const jobFeedSchema = z.object({
	items: z.array(jobSummarySchema),
	nextCursor: z.string().nullable().describe('Pass as `cursor` for the next page; null on the last page.')
});

const recordSchema = z.object({
	mounting: z.string().nullable(),
	torqueNm: z.number().nullable(),
	supplyV: z.number().nullable(),
	polarityOk: z.boolean().nullable(),
	photoMediaId: z.string().nullable(),
	readyAt: z.string().nullable(),
	baselineStartAt: z.string().nullable(),
	deviation: z.string(),
	deviationReason: z.string(),
	findings: z.array(findingSchema),
	worst: z.enum(['pass', 'warn', 'fail']).nullable(),
	recordedAt: z.string().nullable(),
	recordedBy: z.string().nullable()
});

export const jobDetailSchema = jobSummarySchema.extend({
	notes: z.string(),
	closeNote: z.string(),
	tools: z.array(z.string()),
	materials: z.array(z.record(z.string(), z.unknown())),
	lockout: z.record(z.string(), z.unknown()).describe('Whether the machine must be stopped and locked out, and why'),
	jobPoints: z.array(
		z.object({
			id: z.uuid().describe('The job point id (POST its as-installed record to /api/v1/jobs/{id}/points/{pointId}/record)'),
			number: z.number().int(),
			label: z.string(),
			component: z.string(),
			machineId: z.uuid(),
			machine: z.string(),
			boardId: z.uuid(),
			direction: z.string().nullable(),
			surface: z.string().nullable(),
			mounting: z.string().nullable(),
			material: z.string().nullable(),
			notes: z.string(),
			planFindings: z.array(findingSchema).describe('Rule findings of the point as approved'),
			preparation: z
				.record(z.string(), z.unknown())
				.describe('Seat preparation for the mounting method (spot face, thread, pad, cure time)'),
			preparationSummary: z.string(),
			torqueLimitNm: z.number().nullable(),
			conductor: z.string().nullable(),
			route: z
				.object({
					lengthM: z.number().nullable(),
					crossSectionMm2: z.number().nullable(),
					supply: z.string().nullable(),
					supplyV: z.number().nullable()
				})
				.nullable(),
			record: recordSchema.nullable().describe('The as-installed record with its findings; null until recorded')
		})
	)
});

export const jobPackQuerySchema = z.object({ paper: z.enum(['A4', 'Letter']).default('A4').describe('Paper size of the PDF') });
