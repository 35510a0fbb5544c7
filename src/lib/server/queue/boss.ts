// The durable job queue: pg-boss on the app's own database (its tables live in the `pgboss`
// schema, which pg-boss creates and migrates itself when it starts). Webhook deliveries and
// e-mail run as jobs with retries and back-off. Our own rows (webhook_delivery, mail_outbox)
// stay the record of what was sent; a job carries only the row's id, so a job is safe to run
// twice and a row whose job was lost is queued again when the queue starts (`sweep`).
import PgBoss from 'pg-boss';
import { CompiledQuery } from 'kysely';
import type pg from 'pg';
import type { DB } from '../db/index';

export const MAIL_QUEUE = 'mail-send';
export const WEBHOOK_QUEUE = 'webhook-deliver';

export interface RetryPolicy {
	/** Attempts after the first. */
	retryLimit: number;
	/** Seconds before the first retry; doubled (with jitter) for each next one. */
	retryDelay: number;
}

export interface QueueSettings {
	pollSeconds: number;
	mail: RetryPolicy;
	webhook: RetryPolicy;
}

export type JobHandler = (job: PgBoss.JobWithMetadata<{ id: string }>) => Promise<void>;

let boss: PgBoss | null = null;
let settings: QueueSettings | null = null;
const workers = new Map<string, string>();

/** The running queue in this process, or null (scripts, tests calling repositories directly). */
export function runningQueue(): PgBoss | null {
	return boss;
}

/** pg-boss's database access through a Kysely connection (a transaction, so the job commits with the row). */
function through(db: DB): PgBoss.Db {
	return {
		executeSql: async (text, values) => {
			const r = await db.executeQuery(CompiledQuery.raw(text, values ?? []));
			return { rows: r.rows as unknown[] as never[] };
		}
	};
}

/**
 * Queues a job for a row in the same transaction as the row (pass the transaction), so both
 * exist or neither does. Without a running queue in this process the row waits for the sweep.
 */
export async function enqueue(db: DB, queue: string, id: string): Promise<void> {
	if (!boss || !settings) return;
	const p = queue === MAIL_QUEUE ? settings.mail : settings.webhook;
	await boss.send(queue, { id }, { db: through(db), retryLimit: p.retryLimit, retryDelay: p.retryDelay, retryBackoff: true });
}

/** Wakes this process's worker for a queue now (after a commit) instead of at its next poll. */
export function wake(queue: string) {
	const w = workers.get(queue);
	if (boss && w) boss.notifyWorker(w);
}

/** Starts pg-boss on the pool, creates the queues and runs one worker per queue. */
export async function startBoss(
	pool: pg.Pool,
	s: QueueSettings,
	handlers: Record<string, JobHandler>,
	sweep: () => Promise<void>
): Promise<PgBoss> {
	if (boss) return boss;
	const b = new PgBoss({
		db: { executeSql: (text, values) => pool.query(text, values) as Promise<{ rows: never[] }> },
		schema: 'pgboss',
		// Completed and failed jobs are kept a week; our own rows keep the history beyond that.
		deleteAfterDays: 7
	});
	b.on('error', (err) => console.error('[queue]', err instanceof Error ? err.message : err));
	await b.start();
	for (const [name, p] of [
		[MAIL_QUEUE, s.mail],
		[WEBHOOK_QUEUE, s.webhook]
	] as const) {
		await b.createQueue(name, { name, retryLimit: p.retryLimit, retryDelay: p.retryDelay, retryBackoff: true });
	}
	boss = b;
	settings = s;
	for (const [name, handler] of Object.entries(handlers)) {
		const id = await b.work<{ id: string }>(
			name,
			{ pollingIntervalSeconds: s.pollSeconds, batchSize: 1, includeMetadata: true },
			async (jobs) => {
				for (const job of jobs) await handler(job);
			}
		);
		workers.set(name, id);
	}
	await sweep();
	return b;
}

export async function stopBoss() {
	const b = boss;
	boss = null;
	workers.clear();
	if (b) await b.stop({ graceful: true, wait: true, timeout: 5000 });
}
