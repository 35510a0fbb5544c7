// The durable job queue: pg-boss on the app's own database (its tables live in the `pgboss`
// schema, which pg-boss creates and migrates itself when it starts). Webhook deliveries and
// e-mail run as jobs with retries and back-off. Our own rows (webhook_delivery, mail_outbox)
// stay the record of what was sent; a job carries only the row's id, so a job is safe to run
// twice and a row whose job was lost is queued again when the queue starts (`sweep`).
import PgBoss from 'pg-boss';
import { CompiledQuery } from 'kysely';
import type pg from 'pg';
import type { DB } from '../db/index';

/** E-mail jobs go to a queue per mail server (see `mailQueueName`); webhooks to one queue. */
export const MAIL_QUEUE_PREFIX = 'mail-send';
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

export interface QueueDefinition {
	name: string;
	policy: RetryPolicy;
	handler: JobHandler;
}

export type JobHandler = (job: PgBoss.JobWithMetadata<{ id: string }>) => Promise<void>;

let boss: PgBoss | null = null;
const policies = new Map<string, RetryPolicy>();
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
	const p = policies.get(queue);
	if (!boss || !p) return;
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
	pollSeconds: number,
	queues: QueueDefinition[],
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
	for (const q of queues) {
		await b.createQueue(q.name, { name: q.name, retryLimit: q.policy.retryLimit, retryDelay: q.policy.retryDelay, retryBackoff: true });
		policies.set(q.name, q.policy);
	}
	boss = b;
	for (const { name, handler } of queues) {
		// Up to 20 jobs per fetch, run side by side; each one that throws is failed on its own
		// (pg-boss retries it after its back-off), the rest are completed together.
		const id = await b.work<{ id: string }>(
			name,
			{ pollingIntervalSeconds: pollSeconds, batchSize: 20, includeMetadata: true },
			async (jobs) => {
				await Promise.all(
					jobs.map(async (job) => {
						try {
							await handler(job);
						} catch (e) {
							await b.fail(name, job.id, { message: e instanceof Error ? e.message : String(e) });
						}
					})
				);
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
	policies.clear();
	if (b) await b.stop({ graceful: true, wait: true, timeout: 5000 });
}
