import { requirePage } from '$lib/server/auth/require';
import { openApiDocument } from '$lib/server/integration/openapi';
import { SIGNATURE_HEADER, TIMESTAMP_HEADER, EVENT_HEADER, DELIVERY_HEADER } from '$lib/server/integration/webhook-signature';
import type { PageServerLoad } from './$types';

interface Param {
	name: string;
	in: string;
	required?: boolean;
	description?: string;
	schema?: Record<string, unknown>;
}
interface Op {
	summary: string;
	description: string;
	tags: string[];
	parameters?: Param[];
	requestBody?: { content: Record<string, { schema: unknown; example?: unknown }> };
	responses: Record<string, { description: string; content?: Record<string, { schema: unknown }> }>;
	'x-example-request': string;
}

/** The OpenAPI document laid out for reading: one entry per operation, grouped by tag. */
export const load: PageServerLoad = ({ locals, url }) => {
	requirePage(locals, 'organisation.read', url);
	const doc = openApiDocument() as { info: { description: string }; paths: Record<string, Record<string, Op>> };
	const operations = Object.entries(doc.paths).flatMap(([path, methods]) =>
		Object.entries(methods).map(([method, op]) => {
			const ok = Object.entries(op.responses).find(([code]) => code.startsWith('2'));
			const body = op.requestBody ? Object.entries(op.requestBody.content)[0] : null;
			return {
				id: `${method}-${path}`.replace(/[^a-z0-9]+/gi, '-'),
				method: method.toUpperCase(),
				path,
				tag: op.tags[0] ?? 'Other',
				summary: op.summary,
				description: op.description,
				parameters: (op.parameters ?? []).map((p) => ({
					name: p.name,
					in: p.in,
					required: Boolean(p.required),
					description: p.description ?? (p.schema?.description as string | undefined) ?? '',
					type: String(p.schema?.type ?? (p.schema?.enum ? 'enum' : '')),
					values: Array.isArray(p.schema?.enum) ? (p.schema.enum as string[]).join(', ') : ''
				})),
				bodyType: body?.[0] ?? null,
				bodySchema: body ? JSON.stringify(body[1].schema, null, 2) : null,
				responseCode: ok?.[0] ?? '200',
				responseSchema: ok?.[1].content ? JSON.stringify(Object.values(ok[1].content)[0].schema, null, 2) : null,
				example: op['x-example-request']
			};
		})
	);
	const tags = [...new Set(operations.map((o) => o.tag))];
	return {
		intro: doc.info.description,
		tags: tags.map((t) => ({ tag: t, operations: operations.filter((o) => o.tag === t) })),
		headers: { signature: SIGNATURE_HEADER, timestamp: TIMESTAMP_HEADER, event: EVENT_HEADER, delivery: DELIVERY_HEADER }
	};
};
