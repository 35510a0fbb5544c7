import { machineImportQuerySchema as query, queryObject } from '$lib/schemas/register';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { json, problem } from '$lib/server/http/problem';
import { record } from '$lib/server/db/audit';
import { decode, importMachineCsv, ImportRefused, MAX_CSV_BYTES, validateMachineCsv } from '$lib/server/register/csv';
import type { RequestHandler } from './$types';

/**
 * Body: the CSV file (text/csv). ?siteId= the site for rows without a site column;
 * ?mode=all|valid; ?dryRun=true for the report only.
 */
export const POST: RequestHandler = async ({ locals, request, url }) => {
	const v = requireApi(locals, 'register.write');
	if (v instanceof Response) return v;
	const q = query.safeParse(queryObject(url));
	if (!q.success) return problem(400, q.error.issues[0]!.message);
	const bytes = new Uint8Array(await request.arrayBuffer());
	if (bytes.length > MAX_CSV_BYTES)
		return problem(413, `The file is larger than ${MAX_CSV_BYTES / 1024 / 1024} MB. Split it into smaller files.`);
	const text = decode(bytes);
	const db = context().handle.db;
	if (q.data.dryRun === 'true' || q.data.dryRun === '1') {
		const { report } = await validateMachineCsv(db, v.organisationId, text, { defaultSiteId: q.data.siteId });
		return json({ imported: 0, report });
	}
	try {
		const r = await importMachineCsv(db, v.organisationId, text, { defaultSiteId: q.data.siteId, mode: q.data.mode });
		await record(db, {
			organisationId: v.organisationId,
			actorUserId: v.userId,
			action: 'machine.imported',
			data: { imported: r.imported, skipped: r.skipped }
		});
		return json({ imported: r.imported, skipped: r.skipped, ids: r.ids, report: r.report }, { status: 201 });
	} catch (e) {
		if (e instanceof ImportRefused) {
			return new Response(
				JSON.stringify({ type: 'about:blank', title: 'Import refused', status: 422, detail: e.message, report: e.report }),
				{
					status: 422,
					headers: { 'content-type': 'application/problem+json' }
				}
			);
		}
		throw e;
	}
};
