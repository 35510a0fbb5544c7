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
		rule: z.string(),
		severity: z.enum(['pass', 'warn', 'fail']),
		message: z.string()
	})
	.passthrough()
	.describe('One rule finding as stored at approval.');

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
