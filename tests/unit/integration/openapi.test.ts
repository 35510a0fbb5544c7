// The OpenAPI document validates as OpenAPI 3.1, and every route file under src/routes/api/v1
// with each method it exports appears in it (so a new route cannot go undocumented).
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { Validator } from '@seriousme/openapi-schema-validator';
import { openApiDocument, OPERATIONS } from '../../../src/lib/server/integration/openapi';

const ROOT = join(process.cwd(), 'src/routes/api/v1');

function routeFiles(dir: string): string[] {
	return readdirSync(dir).flatMap((name) => {
		const p = join(dir, name);
		if (statSync(p).isDirectory()) return routeFiles(p);
		return name === '+server.ts' ? [p] : [];
	});
}

/** src/routes/api/v1/surveys/[id=uuid]/revisions/[number]/+server.ts → /api/v1/surveys/{id}/revisions/{number} */
function openApiPath(file: string): string {
	const rel = relative(ROOT, file).split(sep).slice(0, -1);
	return '/api/v1' + rel.map((seg) => '/' + seg.replace(/^\[([a-zA-Z]+)(=[a-z]+)?\]$/, '{$1}')).join('');
}

/** The HTTP methods a +server.ts exports: `export const GET` and `export const { GET, POST } = ...`. */
function exportedMethods(source: string): string[] {
	const out = new Set<string>();
	for (const m of source.matchAll(/export\s+(?:const|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE)\b/g)) out.add(m[1]);
	for (const m of source.matchAll(/export\s+const\s+\{([^}]*)\}/g)) {
		for (const name of m[1].split(',').map((s) => s.trim().split(':')[0].trim())) {
			if (/^(GET|POST|PUT|PATCH|DELETE)$/.test(name)) out.add(name);
		}
	}
	return [...out].sort();
}

describe('the OpenAPI document', () => {
	const doc = openApiDocument() as { openapi: string; paths: Record<string, Record<string, unknown>> };

	it('is valid OpenAPI 3.1', async () => {
		expect(doc.openapi).toBe('3.1.0');
		const validator = new Validator();
		const result = await validator.validate(doc as never);
		expect(result.errors ?? []).toEqual([]);
		expect(result.valid).toBe(true);
		expect(validator.version).toBe('3.1');
	});

	it('has every route file under /api/v1 and each method it exports', () => {
		const files = routeFiles(ROOT);
		expect(files.length).toBeGreaterThan(30);
		const missing: string[] = [];
		for (const f of files) {
			const path = openApiPath(f);
			const methods = exportedMethods(readFileSync(f, 'utf8'));
			expect(methods.length, `${f} exports no method`).toBeGreaterThan(0);
			for (const m of methods) if (!doc.paths[path]?.[m.toLowerCase()]) missing.push(`${m} ${path}`);
		}
		expect(missing).toEqual([]);
	});

	it('documents nothing that has no route (no stale entries)', () => {
		const real = new Set(
			routeFiles(ROOT).flatMap((f) => exportedMethods(readFileSync(f, 'utf8')).map((m) => `${m.toLowerCase()} ${openApiPath(f)}`))
		);
		expect(OPERATIONS.map((o) => `${o.method} ${o.path}`).filter((k) => !real.has(k))).toEqual([]);
	});

	it('takes request bodies from the zod schemas the routes use', () => {
		const sites = doc.paths['/api/v1/sites'].post as { requestBody: { content: Record<string, { schema: Record<string, unknown> }> } };
		const schema = sites.requestBody.content['application/json'].schema as { properties: Record<string, unknown>; required: string[] };
		expect(Object.keys(schema.properties)).toContain('name');
		expect(schema.required).toContain('name');
		const feed = doc.paths['/api/v1/revisions'].get as { parameters: Array<{ name: string; in: string }> };
		expect(feed.parameters.map((p) => `${p.in}:${p.name}`).sort()).toEqual(['query:cursor', 'query:limit', 'query:since']);
	});

	it('gives every operation an example request, and every POST the Idempotency-Key header', () => {
		for (const [path, methods] of Object.entries(doc.paths)) {
			for (const [method, op] of Object.entries(methods) as Array<
				[string, { 'x-example-request': string; parameters?: Array<{ name: string; in: string }> }]
			>) {
				expect(op['x-example-request'], `${method} ${path}`).toMatch(/^curl -X [A-Z]+ /);
				if (method === 'post')
					expect(
						op.parameters?.some((p) => p.in === 'header' && p.name === 'Idempotency-Key'),
						`${method} ${path}`
					).toBe(true);
			}
		}
	});
});
