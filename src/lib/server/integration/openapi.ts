// The OpenAPI 3.1 document of /api/v1, generated from the zod schemas the routes validate with
// (@asteasolutions/zod-to-openapi). Each route is listed once below with its guard action, its
// request schemas and an example; tests/unit/integration/openapi.test.ts walks the route files
// and fails when a route or method is missing here.
import { OpenAPIRegistry, OpenApiGeneratorV31 } from '@asteasolutions/zod-to-openapi';
import { z } from 'zod';
import {
	areaSchema,
	areaUpdateSchema,
	bearingSchema,
	bearingUpdateSchema,
	machineImportQuerySchema,
	machineListQuerySchema,
	machineSchema,
	machineUpdateSchema,
	mediaListQuerySchema,
	mediaUpdateSchema,
	mediaUploadFieldsSchema,
	pageQuerySchema,
	siteSchema,
	siteUpdateSchema,
	supplyPointSchema,
	supplyPointUpdateSchema
} from '../../schemas/register';
import { invitationCreateSchema, memberRoleSchema, organisationUpdateSchema } from '../../schemas/auth';
import { commentCreateSchema, commentEditSchema, commentListQuerySchema, commentReplySchema } from '../../schemas/comment';
import { compareQuerySchema, transitionSchema } from '../../schemas/review';
import {
	changesQuerySchema,
	jobDetailSchema,
	jobFeedSchema,
	jobPackQuerySchema,
	revisionDetailSchema,
	revisionFeedSchema
} from '../../schemas/integration';
import { recordPointSchema } from '../../schemas/job';
import { thresholdsSchema } from '../../trade';
import { PERMISSIONS, type Action } from '../auth/guard';

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface Operation {
	method: Method;
	/** OpenAPI path, e.g. /api/v1/sites/{id} */
	path: string;
	summary: string;
	tag: string;
	/** The guard action the route asks for (its roles are listed in the description). */
	action: Action;
	query?: z.ZodObject;
	body?: z.ZodType;
	/** Request media type when not JSON. */
	bodyType?: 'multipart/form-data' | 'text/csv';
	response?: z.ZodType;
	/** Non-JSON answer (a file). */
	responseType?: string;
	/** An example request body (JSON) for the reference page and the document. */
	example?: unknown;
	/** An example query string for GET requests, e.g. ?since=... */
	exampleQuery?: string;
	status?: 200 | 201;
}

const ID = '3f0c9a8e-5b7d-4c2a-9e1f-2a6b8c4d7e01';
const POINT_ID = '7b2e4d1a-9c3f-4e8b-a5d6-0f1e2d3c4b5a';
const JSON_OBJECT = z.record(z.string(), z.unknown()).describe('JSON object; see the route for its fields.');

const problemSchema = z
	.object({
		type: z.string(),
		title: z.string(),
		status: z.number().int(),
		detail: z.string().optional(),
		errors: z.record(z.string(), z.array(z.string())).optional().describe('Messages per field (dotted paths).')
	})
	.meta({ id: 'Problem', description: 'RFC 9457 problem details' });

const crud = (
	base: string,
	noun: string,
	tag: string,
	create: z.ZodType | null,
	update: z.ZodType,
	examples: { create?: unknown; update: unknown },
	read: Action = 'register.read',
	write: Action = 'register.write'
): Operation[] => [
	...(create
		? ([
				{ method: 'get', path: base, summary: `List ${noun}s (paged, searchable)`, tag, action: read, query: pageQuerySchema },
				{ method: 'post', path: base, summary: `Create a ${noun}`, tag, action: write, body: create, example: examples.create, status: 201 }
			] as Operation[])
		: []),
	{ method: 'get', path: `${base}/{id}`, summary: `Get a ${noun}`, tag, action: read },
	{ method: 'patch', path: `${base}/{id}`, summary: `Change a ${noun}`, tag, action: write, body: update, example: examples.update },
	{ method: 'delete', path: `${base}/{id}`, summary: `Archive a ${noun} (it stays readable by id)`, tag, action: write }
];

export const OPERATIONS: Operation[] = [
	// Integration
	{
		method: 'get',
		path: '/api/v1/revisions',
		summary: 'Approved revisions changed since a time (cursor paging, oldest first)',
		tag: 'Integration',
		action: 'survey.read',
		query: changesQuerySchema,
		response: revisionFeedSchema,
		exampleQuery: '?since=2026-01-01T00:00:00Z&limit=50'
	},
	{
		method: 'get',
		path: '/api/v1/revisions/{id}',
		summary: 'One approved revision with its points and findings',
		tag: 'Integration',
		action: 'survey.read',
		response: revisionDetailSchema
	},
	{
		method: 'get',
		path: '/api/v1/jobs',
		summary: 'Installation jobs changed since a time (issued, recorded on, closed; cursor paging, oldest change first)',
		tag: 'Integration',
		action: 'job.read',
		query: changesQuerySchema,
		response: jobFeedSchema,
		exampleQuery: '?since=2026-01-01T00:00:00Z&limit=50'
	},
	{
		method: 'get',
		path: '/api/v1/jobs/{id}',
		summary: 'One job with its points, seat preparation, findings and as-installed records',
		tag: 'Integration',
		action: 'job.read',
		response: jobDetailSchema
	},
	{
		method: 'get',
		path: '/api/v1/jobs/{id}/pack',
		summary: 'The job pack as a PDF',
		tag: 'Integration',
		action: 'job.read',
		query: jobPackQuerySchema,
		responseType: 'application/pdf',
		exampleQuery: '?paper=A4'
	},
	{
		method: 'post',
		path: '/api/v1/jobs/{id}/points/{pointId}/record',
		summary: 'The as-installed record of one job point (JSON, or multipart with a `photo`); answers its findings',
		tag: 'Integration',
		action: 'job.record',
		body: recordPointSchema,
		example: {
			mounting: 'stud',
			torqueNm: 8,
			supplyV: 23.6,
			polarity: 'ok',
			readyAt: '2026-03-03T09:40:00Z',
			baselineStartAt: '2026-03-03T10:00:00Z',
			deviation: '',
			deviationReason: '',
			recordKey: 'maint-system-wo-4711-p1'
		}
	},
	{
		method: 'get',
		path: '/api/v1/openapi.json',
		summary: 'This document',
		tag: 'Integration',
		action: 'organisation.read',
		response: JSON_OBJECT
	},
	// Organisation and members
	{ method: 'get', path: '/api/v1/organisation', summary: 'Your organisation', tag: 'Organisation', action: 'organisation.read' },
	{
		method: 'patch',
		path: '/api/v1/organisation',
		summary: 'Rename the organisation',
		tag: 'Organisation',
		action: 'organisation.manage',
		body: organisationUpdateSchema,
		example: { name: 'Harrowgate Water Services' }
	},
	{ method: 'get', path: '/api/v1/members', summary: 'Members with their roles', tag: 'Organisation', action: 'member.read' },
	{ method: 'get', path: '/api/v1/members/{id}', summary: 'One member', tag: 'Organisation', action: 'member.read' },
	{
		method: 'patch',
		path: '/api/v1/members/{id}',
		summary: "Change a member's role",
		tag: 'Organisation',
		action: 'member.change-role',
		body: memberRoleSchema,
		example: { role: 'technician' }
	},
	{ method: 'delete', path: '/api/v1/members/{id}', summary: 'Remove a member', tag: 'Organisation', action: 'member.remove' },
	{ method: 'get', path: '/api/v1/invitations', summary: 'Open invitations', tag: 'Organisation', action: 'member.invite' },
	{
		method: 'post',
		path: '/api/v1/invitations',
		summary: 'Invite someone by e-mail with a role',
		tag: 'Organisation',
		action: 'member.invite',
		body: invitationCreateSchema,
		example: { email: 'new.tech@harrowgate.example', role: 'technician' },
		status: 201
	},
	{ method: 'get', path: '/api/v1/invitations/{id}', summary: 'One invitation', tag: 'Organisation', action: 'member.invite' },
	{ method: 'delete', path: '/api/v1/invitations/{id}', summary: 'Withdraw an invitation', tag: 'Organisation', action: 'member.invite' },
	{
		method: 'get',
		path: '/api/v1/settings/thresholds',
		summary: 'Rule thresholds: effective values, overrides, defaults',
		tag: 'Organisation',
		action: 'thresholds.read'
	},
	{
		method: 'put',
		path: '/api/v1/settings/thresholds',
		summary: 'Replace the threshold overrides ({ key: number } for each value that differs from its default)',
		tag: 'Organisation',
		action: 'thresholds.edit',
		body: thresholdsSchema,
		example: {}
	},
	{
		method: 'delete',
		path: '/api/v1/settings/thresholds',
		summary: 'Back to the default thresholds',
		tag: 'Organisation',
		action: 'thresholds.edit'
	},
	// Register
	...crud('/api/v1/sites', 'site', 'Register', siteSchema, siteUpdateSchema, {
		create: { name: 'Eastfield Pumping Station', code: 'EPS', address: '' },
		update: { name: 'Eastfield Pumping Station (north)' }
	}),
	...crud('/api/v1/areas', 'area', 'Register', areaSchema, areaUpdateSchema, {
		create: { siteId: ID, name: 'Pump hall' },
		update: { name: 'Pump hall A' }
	}),
	...crud('/api/v1/supply-points', 'supply point', 'Register', supplyPointSchema, supplyPointUpdateSchema, {
		create: { areaId: ID, label: 'JB-24-01', voltageV: 24 },
		update: { label: 'JB-24-02' }
	}),
	{
		method: 'get',
		path: '/api/v1/machines',
		summary: 'List machines (paged, sorted, filtered)',
		tag: 'Register',
		action: 'register.read',
		query: machineListQuerySchema,
		exampleQuery: '?kind=pump&sort=name'
	},
	{
		method: 'post',
		path: '/api/v1/machines',
		summary: 'Create a machine',
		tag: 'Register',
		action: 'register.write',
		body: machineSchema,
		example: { siteId: ID, name: 'Raw water pump 2', tag: 'P-102', kind: 'pump', speedRpm: 1480, speedMode: 'constant' },
		status: 201
	},
	...crud('/api/v1/machines', 'machine', 'Register', null, machineUpdateSchema, { update: { speedRpm: 1490 } }),
	{
		method: 'post',
		path: '/api/v1/machines/{id}/restore',
		summary: 'Restore an archived machine',
		tag: 'Register',
		action: 'register.write'
	},
	{
		method: 'get',
		path: '/api/v1/machines/export',
		summary: 'Machines as CSV',
		tag: 'Register',
		action: 'register.read',
		query: machineListQuerySchema,
		responseType: 'text/csv'
	},
	{
		method: 'post',
		path: '/api/v1/machines/import',
		summary: 'Import machines from CSV (report per row; dryRun for the report only)',
		tag: 'Register',
		action: 'register.write',
		query: machineImportQuerySchema,
		bodyType: 'text/csv',
		body: z.string().describe('The CSV file')
	},
	{
		method: 'get',
		path: '/api/v1/machines/{id}/bearings',
		summary: "A machine's bearings",
		tag: 'Register',
		action: 'register.read',
		query: pageQuerySchema
	},
	{
		method: 'post',
		path: '/api/v1/machines/{id}/bearings',
		summary: 'Add a bearing to a machine',
		tag: 'Register',
		action: 'register.write',
		body: bearingSchema,
		example: { position: 'drive_end', designation: '6310', rollingElements: 8, rollingElementDMm: 17.46, pitchDMm: 80 },
		status: 201
	},
	...crud('/api/v1/bearings', 'bearing', 'Register', null, bearingUpdateSchema, { update: { designation: '6310-2Z' } }),
	{
		method: 'get',
		path: '/api/v1/machines/{id}/media',
		summary: "A machine's photos and drawings",
		tag: 'Media',
		action: 'register.read',
		query: mediaListQuerySchema
	},
	{
		method: 'post',
		path: '/api/v1/machines/{id}/media',
		summary: 'Upload a photo or drawing (multipart: file, kind, caption)',
		tag: 'Media',
		action: 'media.upload',
		bodyType: 'multipart/form-data',
		body: mediaUploadFieldsSchema.extend({ file: z.string().describe('JPEG, PNG, WebP or PDF (first page)') }),
		status: 201
	},
	{ method: 'get', path: '/api/v1/media/{id}', summary: 'One photo or drawing', tag: 'Media', action: 'register.read' },
	{
		method: 'patch',
		path: '/api/v1/media/{id}',
		summary: 'Change caption or kind',
		tag: 'Media',
		action: 'register.field-edit',
		body: mediaUpdateSchema,
		example: { caption: 'Pump from the north side' }
	},
	{ method: 'delete', path: '/api/v1/media/{id}', summary: 'Archive a photo or drawing', tag: 'Media', action: 'register.write' },
	{
		method: 'get',
		path: '/api/v1/media/{id}/display',
		summary: 'Display image',
		tag: 'Media',
		action: 'register.read',
		responseType: 'image/*'
	},
	{ method: 'get', path: '/api/v1/media/{id}/thumb', summary: 'Thumbnail', tag: 'Media', action: 'register.read', responseType: 'image/*' },
	{
		method: 'get',
		path: '/api/v1/media/{id}/original',
		summary: 'The original file, as a download',
		tag: 'Media',
		action: 'register.read',
		responseType: 'application/octet-stream'
	},
	// Surveys and review
	{
		method: 'get',
		path: '/api/v1/surveys/{id}/transitions',
		summary: "A survey's history of moves",
		tag: 'Review',
		action: 'survey.read'
	},
	{
		method: 'post',
		path: '/api/v1/surveys/{id}/transitions',
		summary: 'Move a survey (submit, request changes, approve, reopen, …)',
		tag: 'Review',
		action: 'survey.read',
		body: transitionSchema,
		example: { transition: 'approve', note: 'Layout agreed on site.', confirmExceptions: false }
	},
	{ method: 'post', path: '/api/v1/surveys/{id}/archive', summary: 'Archive a survey', tag: 'Review', action: 'survey.archive' },
	{ method: 'get', path: '/api/v1/surveys/{id}/revisions', summary: "A survey's approved revisions", tag: 'Review', action: 'survey.read' },
	{
		method: 'get',
		path: '/api/v1/surveys/{id}/revisions/{number}',
		summary: 'One revision of a survey, every stored row',
		tag: 'Review',
		action: 'survey.read'
	},
	{
		method: 'get',
		path: '/api/v1/surveys/{id}/revisions/compare',
		summary: 'Compare two revisions',
		tag: 'Review',
		action: 'survey.read',
		query: compareQuerySchema,
		exampleQuery: '?from=1&to=2'
	},
	{
		method: 'get',
		path: '/api/v1/surveys/{id}/comments',
		summary: "A survey's comments",
		tag: 'Comments',
		action: 'survey.read',
		query: commentListQuerySchema
	},
	{
		method: 'post',
		path: '/api/v1/surveys/{id}/comments',
		summary: 'Comment on the survey, a board, a point or a route',
		tag: 'Comments',
		action: 'comment.write',
		body: commentCreateSchema,
		example: { targetKind: 'survey', body: 'Machine 2 needs an outage window for the DE point.' },
		status: 201
	},
	{ method: 'get', path: '/api/v1/comments/{id}', summary: 'One comment', tag: 'Comments', action: 'survey.read' },
	{
		method: 'patch',
		path: '/api/v1/comments/{id}',
		summary: 'Edit your comment',
		tag: 'Comments',
		action: 'comment.write',
		body: commentEditSchema,
		example: { body: 'Machine 2 needs an outage window for both points.' }
	},
	{
		method: 'post',
		path: '/api/v1/comments/{id}/replies',
		summary: 'Reply to a comment',
		tag: 'Comments',
		action: 'comment.write',
		body: commentReplySchema,
		example: { body: 'Outage booked for Tuesday.' },
		status: 201
	}
];

/** The curl line the reference page shows for an operation. */
export function exampleRequest(op: Operation, origin = 'https://spotface.example'): string {
	const url = origin + op.path.replace('{id}', ID).replace('{pointId}', POINT_ID).replace('{number}', '1') + (op.exampleQuery ?? '');
	const parts = [`curl -X ${op.method.toUpperCase()} '${url}'`, `-H 'Authorization: Bearer $SPOTFACE_TOKEN'`];
	if (op.method === 'post') parts.push(`-H 'Idempotency-Key: $(uuidgen)'`);
	if (op.bodyType === 'multipart/form-data') parts.push(`-F 'file=@pump.jpg' -F 'kind=photo'`);
	else if (op.bodyType === 'text/csv') parts.push(`-H 'Content-Type: text/csv' --data-binary @machines.csv`);
	else if (op.body) parts.push(`-H 'Content-Type: application/json'`, `-d '${JSON.stringify(op.example ?? {})}'`);
	return parts.join(' \\\n  ');
}

/**
 * A query schema as documented: a parameter the route forgives (`.catch`) or fills in
 * (`.default`) is optional in the query string. zod-to-openapi has no `.catch`, so the wrapper is
 * taken off here; the schema inside is the route's own.
 */
function documentedQuery(q: z.ZodObject): z.ZodObject {
	const shape: Record<string, z.ZodType> = {};
	for (const [k, original] of Object.entries(q.shape as Record<string, z.ZodType>)) {
		let t = original;
		let wrapped = false;
		for (;;) {
			const def = t._zod.def as { type: string; innerType?: z.ZodType };
			if ((def.type === 'catch' || def.type === 'default' || def.type === 'optional') && def.innerType) {
				t = def.innerType;
				wrapped = true;
			} else break;
		}
		const description = original.description ?? t.description;
		const documented = wrapped ? t.optional() : original;
		shape[k] = description ? documented.describe(description) : documented;
	}
	return z.object(shape);
}

function paramsOf(path: string) {
	const names = [...path.matchAll(/\{(\w+)\}/g)].map((m) => m[1]);
	if (names.length === 0) return undefined;
	return z.object(Object.fromEntries(names.map((n) => [n, n === 'number' ? z.string().regex(/^\d+$/) : z.uuid()])));
}

let cached: Record<string, unknown> | null = null;

export function openApiDocument(): Record<string, unknown> {
	if (cached) return cached;
	const registry = new OpenAPIRegistry();
	registry.registerComponent('securitySchemes', 'bearerAuth', {
		type: 'http',
		scheme: 'bearer',
		description: 'An API token an admin created under Settings → Integration. Read-only tokens are refused (403) on every change.'
	});
	registry.registerComponent('securitySchemes', 'sessionCookie', {
		type: 'apiKey',
		in: 'cookie',
		name: 'spotface_session',
		description: 'The browser session; changes need a same-origin Origin header.'
	});
	const problemContent = { 'application/problem+json': { schema: problemSchema } };
	const idempotencyHeader = z.object({
		'Idempotency-Key': z
			.string()
			.max(255)
			.optional()
			.describe(
				'Any unique string (a UUID). A retry with the same key and body gets the first answer again (header Idempotent-Replayed: true); the same key with another body is 422. Kept 24 h.'
			)
	});
	for (const op of OPERATIONS) {
		const roles = (PERMISSIONS[op.action] as readonly string[]).join(', ');
		const status = op.status ?? 200;
		const okContent = op.responseType
			? { [op.responseType]: { schema: z.string().describe('File contents') } }
			: { 'application/json': { schema: op.response ?? JSON_OBJECT } };
		const bodyContent = op.body
			? {
					[op.bodyType ?? 'application/json']: {
						schema: op.body,
						...(op.example !== undefined ? { example: op.example } : {})
					}
				}
			: undefined;
		registry.registerPath({
			method: op.method,
			path: op.path,
			summary: op.summary,
			tags: [op.tag],
			description: `Guard action \`${op.action}\` (roles: ${roles}).${op.method === 'get' ? '' : ' Needs a read-and-write token.'}`,
			'x-example-request': exampleRequest(op),
			request: {
				params: paramsOf(op.path),
				query: op.query ? documentedQuery(op.query) : undefined,
				headers: op.method === 'post' ? idempotencyHeader : undefined,
				body: bodyContent ? { content: bodyContent, required: true } : undefined
			},
			responses: {
				[status]: { description: 'Success', content: okContent },
				400: { description: 'Invalid input', content: problemContent },
				401: { description: 'Not signed in, or the token is unknown, revoked or expired', content: problemContent },
				403: { description: 'The role or a read-only token does not allow it', content: problemContent },
				404: { description: 'Not found in your organisation', content: problemContent },
				...(op.method === 'post' ? { 422: { description: 'Idempotency-Key reused with another request', content: problemContent } } : {})
			}
		} as Parameters<typeof registry.registerPath>[0]);
	}
	const generator = new OpenApiGeneratorV31(registry.definitions);
	cached = generator.generateDocument({
		openapi: '3.1.0',
		info: {
			title: 'Spotface API',
			version: '1.0.0',
			description:
				'JSON API of Spotface. Authenticate with `Authorization: Bearer <token>` (tokens under Settings → Integration) or the browser session. Every answer is scoped to your organisation: another organisation’s row is 404. Errors are RFC 9457 problem+json. POSTs accept an Idempotency-Key header.'
		},
		servers: [{ url: '/' }],
		security: [{ bearerAuth: [] }, { sessionCookie: [] }]
	}) as unknown as Record<string, unknown>;
	return cached;
}
