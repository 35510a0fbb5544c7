import { machineListQuerySchema, queryObject } from '$lib/schemas/register';
import { requireApi } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import { exportMachines } from '$lib/server/db/machines';
import { machinesToCsv } from '$lib/server/register/csv';
import type { RequestHandler } from './$types';

/** The machine list as CSV, with the same filters and order as the list (no paging). */
export const GET: RequestHandler = async ({ locals, url }) => {
	const v = requireApi(locals, 'register.read');
	if (v instanceof Response) return v;
	const q = machineListQuerySchema.parse(queryObject(url));
	const rows = await exportMachines(context().handle.db, v.organisationId, q);
	const day = new Date().toISOString().slice(0, 10);
	return new Response(machinesToCsv(rows), {
		headers: {
			'content-type': 'text/csv; charset=utf-8',
			'content-disposition': `attachment; filename="machines-${day}.csv"`,
			'cache-control': 'private, no-store'
		}
	});
};
