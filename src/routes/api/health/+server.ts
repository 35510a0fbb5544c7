// Liveness and database health for load balancers and operators. 200 `ok` when the database
// answers and every connection the live board keeps (its listeners, the board writer) is up;
// 503 `degraded` with the part that is down otherwise. The process itself stays up either way
// and recovers by itself once the database is back.
import { sql } from 'kysely';
import { context } from '$lib/server/context';
import { healthReport } from '$lib/server/db-health';
import { json } from '$lib/server/http/problem';
import type { RequestHandler } from './$types';

const PING_TIMEOUT_MS = 3000;

export const GET: RequestHandler = async () => {
	const started = Date.now();
	let database: Record<string, unknown>;
	try {
		const r = await Promise.race([
			sql<{ now: Date }>`select now() as now`.execute(context().handle.db),
			new Promise<never>((_, reject) =>
				setTimeout(() => reject(new Error(`no answer within ${PING_TIMEOUT_MS} ms`)), PING_TIMEOUT_MS).unref()
			)
		]);
		database = { status: 'up', latencyMs: Date.now() - started, time: r.rows[0].now };
	} catch (e) {
		database = { status: 'down', error: (e as Error).message };
	}
	const parts = healthReport();
	const down = [...(database.status === 'down' ? ['database'] : []), ...Object.keys(parts).filter((k) => parts[k].status === 'down')];
	const body = { status: down.length ? 'degraded' : 'ok', down, database, connections: parts };
	return json(body, { status: down.length ? 503 : 200, headers: { 'cache-control': 'no-store' } });
};
