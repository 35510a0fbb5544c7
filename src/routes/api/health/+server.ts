import { sql } from 'kysely';
import { context } from '$lib/server/context';
import { json } from '$lib/server/http/problem';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async () => {
	const started = Date.now();
	try {
		const r = await sql<{ now: Date }>`select now() as now`.execute(context().handle.db);
		return json({ status: 'ok', database: { status: 'up', latencyMs: Date.now() - started, time: r.rows[0].now } });
	} catch (e) {
		return json(
			{ status: 'degraded', database: { status: 'down', error: (e as Error).message } },
			{ status: 503 }
		);
	}
};
