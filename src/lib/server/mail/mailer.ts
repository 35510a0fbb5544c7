import nodemailer, { type Transporter } from 'nodemailer';
import { sql } from 'kysely';
import type { DB } from '../db';
import type { MailAudience, MailPurpose } from '../db/types';
import { createHash } from 'node:crypto';
import { enqueue, MAIL_QUEUE_PREFIX, wake, type JobHandler } from '../queue/boss';

export interface OutgoingMail {
	to: string;
	subject: string;
	text: string;
	purpose: MailPurpose;
	/**
	 * 'organisation' only for mail an organisation's own action sent and whose admins may read it
	 * in the in-app outbox (invitations). Anything carrying a sign-in or reset link, or written to
	 * a person about their own account, stays 'recipient' (the default): no one else ever sees it.
	 */
	audience?: MailAudience;
	/** The organisation whose action sent it; required for audience 'organisation'. */
	organisationId?: string | null;
}

export interface Mailer {
	/**
	 * Writes the message to mail_outbox as 'queued' with a queue job for it (in the caller's
	 * transaction when given one) and returns at once; delivery happens in the background, so how
	 * long a request takes never depends on the mail server (or on whether a message was written at
	 * all, for the callers that write one either way).
	 */
	queue(db: DB, m: OutgoingMail): Promise<void>;
	/** Wakes the mail worker now; `queue` does this itself except inside a transaction (call it after the commit). */
	kick(): void;
	/** The queue this process's messages go to (one per mail server). */
	queueName: string;
	/** The queue job that delivers one message (run by the mail worker, retried with back-off when it throws). */
	deliver: JobHandler;
	/** Queues a job for every message still waiting (rows written while no queue ran, or whose job was lost). */
	sweep(): Promise<number>;
	close(): void;
}

/**
 * One queue per mail server: a process only delivers messages queued for the server it is
 * configured with, so a process with a broken SMTP_URL (or one being changed over) never holds
 * up the others' mail. A message queued under an old server is picked up by the sweep.
 */
export function mailQueueName(smtpUrl: string | undefined): string {
	return `${MAIL_QUEUE_PREFIX}-${createHash('sha256')
		.update(smtpUrl ?? '')
		.digest('hex')
		.slice(0, 12)}`;
}

// A message claimed by a process that died mid-delivery may be claimed again after this long.
const STALE_CLAIM = '10 minutes';

/**
 * Every message is written to mail_outbox first, then delivered by a job on the durable queue
 * (pg-boss): a failed send throws, and the queue tries again later with back-off. The row records
 * each attempt and the outcome, so a failed delivery is visible instead of vanishing.
 */
export function createMailer(opts: { db: DB; smtpUrl?: string; from: string; maxAttempts?: number }): Mailer {
	const transport: Transporter | null = opts.smtpUrl
		? nodemailer.createTransport({ url: opts.smtpUrl, connectionTimeout: 15_000, greetingTimeout: 15_000, socketTimeout: 60_000 })
		: null;
	const MAIL_QUEUE = mailQueueName(opts.smtpUrl);

	const deliver: JobHandler = async (job) => {
		if (!transport) throw new Error('SMTP_URL is not set');
		const row = await sql<{ id: string; to_address: string; subject: string; body_text: string; attempts: number }>`
			update mail_outbox set status = 'sending', claimed_at = now(), attempts = attempts + 1
			where id = ${job.data.id}
			  and (status = 'queued' or (status = 'sending' and claimed_at < now() - ${STALE_CLAIM}::interval))
			returning id, to_address, subject, body_text, attempts`.execute(opts.db);
		const m = row.rows[0];
		if (!m) return; // sent already, given up, or being sent by another worker
		try {
			await transport.sendMail({ from: opts.from, to: m.to_address, subject: m.subject, text: m.body_text });
			await opts.db.updateTable('mail_outbox').set({ status: 'sent', sent_at: new Date(), error: null }).where('id', '=', m.id).execute();
		} catch (err) {
			const message = err instanceof Error ? err.message : String(err);
			const last = job.retryCount >= job.retryLimit;
			console.error(`[mail] delivery of ${m.id} failed (attempt ${m.attempts}${last ? ', giving up' : ''}): ${message}`);
			const nextMs = job.retryDelay * 1000 * 2 ** (job.retryCount + 1);
			await opts.db
				.updateTable('mail_outbox')
				.set({ status: last ? 'failed' : 'queued', error: message, next_attempt_at: new Date(Date.now() + nextMs) })
				.where('id', '=', m.id)
				.execute();
			throw err;
		}
	};

	return {
		async queue(db, m) {
			const audience = m.audience ?? 'recipient';
			if (audience === 'organisation' && !m.organisationId) throw new Error('organisation mail needs its organisation');
			const row = await db
				.insertInto('mail_outbox')
				.values({
					organisation_id: m.organisationId ?? null,
					audience,
					purpose: m.purpose,
					to_address: m.to,
					subject: m.subject,
					body_text: m.text
				})
				.returning('id')
				.executeTakeFirstOrThrow();
			if (!transport) {
				console.warn(`[mail] SMTP_URL not set; a ${m.purpose} message stays queued in mail_outbox`);
				return;
			}
			await enqueue(db, MAIL_QUEUE, row.id);
			if (!db.isTransaction) wake(MAIL_QUEUE);
		},
		queueName: MAIL_QUEUE,
		kick() {
			if (transport) setImmediate(() => wake(MAIL_QUEUE));
		},
		deliver,
		async sweep() {
			if (!transport) return 0;
			const rows = await sql<{ id: string }>`
				select m.id from mail_outbox m
				where (m.status = 'queued' or (m.status = 'sending' and m.claimed_at < now() - ${STALE_CLAIM}::interval))
				  and not exists (select 1 from pgboss.job j where j.name = ${MAIL_QUEUE} and j.data->>'id' = m.id::text
				                  and j.state in ('created', 'retry', 'active'))
				order by m.created_at limit 10000`.execute(opts.db);
			for (const r of rows.rows) await enqueue(opts.db, MAIL_QUEUE, r.id);
			return rows.rows.length;
		},
		close() {}
	};
}
