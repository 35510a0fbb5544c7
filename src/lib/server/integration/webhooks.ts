// Webhooks: an admin registers a URL and the events it wants; each event becomes one delivery
// row per webhook (the exact body, signed on every attempt) and a job on the durable queue,
// written in the caller's transaction so an event and its deliveries commit together.
import { randomBytes, randomUUID } from 'node:crypto';
import { sql } from 'kysely';
import type { DB } from '../db/index';
import type { WebhookEvent } from '../db/integration-types';
import { record } from '../db/audit';
import { enqueue, wake, WEBHOOK_QUEUE, type JobHandler } from '../queue/boss';
import { postGuarded, urlRefusal, type PrivatePolicy } from './outbound';
import { DELIVERY_HEADER, EVENT_HEADER, SIGNATURE_HEADER, signWebhook, TIMESTAMP_HEADER } from './webhook-signature';

export class WebhookError extends Error {
	constructor(
		readonly field: string,
		message: string
	) {
		super(message);
	}
}

export async function createWebhook(
	db: DB,
	organisationId: string,
	actorUserId: string,
	input: { url: string; events: WebhookEvent[]; description: string },
	policy: PrivatePolicy
) {
	const refused = await urlRefusal(input.url, policy);
	if (refused) throw new WebhookError('url', refused);
	const secret = 'whsec_' + randomBytes(32).toString('base64url');
	const hook = await db
		.insertInto('webhook')
		.values({
			organisation_id: organisationId,
			url: input.url,
			events: sql`${[...new Set(input.events)]}::text[]` as unknown as WebhookEvent[],
			description: input.description,
			secret,
			created_by: actorUserId
		})
		.returning(['id', 'url', 'events', 'description', 'created_at'])
		.executeTakeFirstOrThrow();
	await record(db, {
		organisationId,
		actorUserId,
		action: 'webhook.created',
		subjectType: 'webhook',
		subjectId: hook.id,
		data: { url: input.url, events: input.events }
	});
	return { hook, secret };
}

export function listWebhooks(db: DB, organisationId: string) {
	return db
		.selectFrom('webhook')
		.select(['id', 'url', 'events', 'description', 'created_at', 'disabled_at'])
		.where('organisation_id', '=', organisationId)
		.orderBy('created_at', 'desc')
		.execute();
}

/** Stops a webhook: no new deliveries, and queued ones are not sent. False when not found. */
export async function disableWebhook(db: DB, organisationId: string, id: string, actorUserId: string): Promise<boolean> {
	const r = await db
		.updateTable('webhook')
		.set({ disabled_at: new Date() })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.where('disabled_at', 'is', null)
		.returning('id')
		.executeTakeFirst();
	if (r) await record(db, { organisationId, actorUserId, action: 'webhook.disabled', subjectType: 'webhook', subjectId: id });
	return Boolean(r);
}

export function listDeliveries(db: DB, organisationId: string, limit = 50) {
	return db
		.selectFrom('webhook_delivery')
		.innerJoin('webhook', 'webhook.id', 'webhook_delivery.webhook_id')
		.select([
			'webhook_delivery.id',
			'webhook_delivery.event',
			'webhook_delivery.status',
			'webhook_delivery.attempts',
			'webhook_delivery.last_status_code',
			'webhook_delivery.last_error',
			'webhook_delivery.created_at',
			'webhook_delivery.last_attempt_at',
			'webhook_delivery.delivered_at',
			'webhook.url'
		])
		.where('webhook_delivery.organisation_id', '=', organisationId)
		.orderBy('webhook_delivery.created_at', 'desc')
		.limit(limit)
		.execute();
}

/**
 * Announces an event to the organisation's webhooks that asked for it. Pass the transaction that
 * makes the change, so the deliveries exist exactly when the change does. Returns the number of
 * deliveries queued. The body is `{ id, type, createdAt, data }`.
 */
export async function emitEvent(db: DB, organisationId: string, event: WebhookEvent, payload: Record<string, unknown>): Promise<number> {
	const hooks = await db
		.selectFrom('webhook')
		.select('id')
		.where('organisation_id', '=', organisationId)
		.where('disabled_at', 'is', null)
		.where(sql<boolean>`${event} = any(events)`)
		.execute();
	if (hooks.length === 0) return 0;
	const eventId = randomUUID();
	const body = JSON.stringify({ id: eventId, type: event, createdAt: new Date().toISOString(), data: payload });
	for (const h of hooks) {
		const d = await db
			.insertInto('webhook_delivery')
			.values({ organisation_id: organisationId, webhook_id: h.id, event, event_id: eventId, body })
			.returning('id')
			.executeTakeFirstOrThrow();
		await enqueue(db, WEBHOOK_QUEUE, d.id);
	}
	if (!db.isTransaction) wake(WEBHOOK_QUEUE);
	else setTimeout(() => wake(WEBHOOK_QUEUE), 50).unref?.();
	return hooks.length;
}

/** The queue job for one delivery: sign, post, record; throws (and is retried) unless the answer is 2xx. */
export function webhookDeliverer(db: DB, policy: PrivatePolicy): JobHandler {
	return async (job) => {
		const d = await db
			.selectFrom('webhook_delivery')
			.innerJoin('webhook', 'webhook.id', 'webhook_delivery.webhook_id')
			.select([
				'webhook_delivery.id',
				'webhook_delivery.status',
				'webhook_delivery.event',
				'webhook_delivery.body',
				'webhook.url',
				'webhook.secret',
				'webhook.disabled_at'
			])
			.where('webhook_delivery.id', '=', job.data.id)
			.executeTakeFirst();
		if (!d || d.status === 'delivered' || d.status === 'failed') return;
		if (d.disabled_at) {
			await db
				.updateTable('webhook_delivery')
				.set({ status: 'failed', last_error: 'The webhook was disabled.' })
				.where('id', '=', d.id)
				.execute();
			return;
		}
		const timestamp = Math.floor(Date.now() / 1000);
		const headers = {
			[TIMESTAMP_HEADER]: String(timestamp),
			[SIGNATURE_HEADER]: signWebhook(d.secret, timestamp, d.body),
			[EVENT_HEADER]: d.event,
			[DELIVERY_HEADER]: d.id,
			'user-agent': 'Spotface-Webhooks/1'
		};
		const last = job.retryCount >= job.retryLimit;
		let failure: string;
		let code: number | null = null;
		try {
			const r = await postGuarded(d.url, d.body, headers, policy);
			code = r.status;
			if (r.status >= 200 && r.status < 300) {
				await db
					.updateTable('webhook_delivery')
					.set((eb) => ({
						status: 'delivered',
						attempts: eb('attempts', '+', 1),
						last_status_code: r.status,
						last_error: null,
						last_attempt_at: new Date(),
						delivered_at: new Date()
					}))
					.where('id', '=', d.id)
					.execute();
				return;
			}
			failure = `The receiver answered ${r.status}${r.body ? `: ${r.body.slice(0, 200)}` : ''}`;
		} catch (e) {
			failure = e instanceof Error ? e.message : String(e);
		}
		await db
			.updateTable('webhook_delivery')
			.set((eb) => ({
				status: last ? 'failed' : 'retrying',
				attempts: eb('attempts', '+', 1),
				last_status_code: code,
				last_error: failure,
				last_attempt_at: new Date()
			}))
			.where('id', '=', d.id)
			.execute();
		throw new Error(failure);
	};
}

/** Queues a job for every delivery still waiting (written while no queue ran, or whose job was lost). */
export async function sweepDeliveries(db: DB): Promise<number> {
	const rows = await sql<{ id: string }>`
		select d.id from webhook_delivery d
		where d.status in ('queued', 'retrying') and d.created_at > now() - interval '7 days'
		  and not exists (select 1 from pgboss.job j where j.name = ${WEBHOOK_QUEUE} and j.data->>'id' = d.id::text
		                  and j.state in ('created', 'retry', 'active'))
		order by d.created_at limit 10000`.execute(db);
	for (const r of rows.rows) await enqueue(db, WEBHOOK_QUEUE, r.id);
	return rows.rows.length;
}
