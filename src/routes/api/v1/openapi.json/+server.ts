import { requireApi } from '$lib/server/auth/require';
import { json } from '$lib/server/http/problem';
import { openApiDocument } from '$lib/server/integration/openapi';
import type { RequestHandler } from './$types';

/** The OpenAPI 3.1 document of this API, generated from the routes' zod schemas. */
export const GET: RequestHandler = ({ locals }) => {
	const v = requireApi(locals, 'organisation.read');
	if (v instanceof Response) return v;
	return json(openApiDocument());
};
