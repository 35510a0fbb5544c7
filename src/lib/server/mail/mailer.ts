import nodemailer, { type Transporter } from 'nodemailer';
import { sql } from 'kysely';
import type { DB } from '../db';
import type { MailAudience, MailPurpose } from '../db/types';

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
	 * Writes the message to mail_outbox as 'queued' and returns at once; delivery happens in the
	 * background, so how long a request takes never depends on the mail server (or on whether
	 * a message was written at all, for the callers that write one either way).
	 */
	queue(db: DB, m: OutgoingMail): Promise<void>;
	/** Starts delivery now; `queue` does this itself except inside a transaction (call it after the commit). */
	kick(): void;
	/** Delivers every due message now; returns how many were tried. Also runs on a timer. */
	deliverDue(): Promise<number>;
	close(): void;
}

const MAX_ATTEMPTS = 5;
// A message claimed by a process that died mid-delivery is tried again after this long.
const STALE_CLAIM = '10 minutes';

/**
 * Every message is written to mail_outbox first, then handed to SMTP by a small queue; the row
 * records the outcome so a failed delivery is visible and retried instead of vanishing. Several
 * processes may share the queue: rows are claimed with `for update skip locked`.
 */
export function createMailer(opts: { db: DB; smtpUrl?: string; from: string; pollMs?: number }): Mailer {
	const transport: Transporter | null = opts.smtpUrl
		? nodemailer.createTransport({ url: opts.smtpUrl, connectionTimeout: 15_000, greetingTimeout: 15_000, socketTimeout: 60_000 })
		: null;
	let running: Promise<number> | null = null;
	let again = false;

	async function deliverBatch(): Promise<number> {
		if (!transport) return 0;
		const rows = await sql<{ id: string; to_address: string; subject: string; body_text: string; attempts: number }>`
			update mail_outbox set status = 'sending', claimed_at = now(), attempts = attempts + 1
			where id in (
				select id from mail_outbox
				where (status = 'queued' and next_attempt_at <= now())
				   or (status = 'sending' and claimed_at < now() - ${STALE_CLAIM}::interval)
				order by created_at limit 20
				for update skip locked)
			returning id, to_address, subject, body_text, attempts`.execute(opts.db);
		await Promise.all(
			rows.rows.map(async (row) => {
				try {
					await transport.sendMail({ from: opts.from, to: row.to_address, subject: row.subject, text: row.body_text });
					await opts.db
						.updateTable('mail_outbox')
						.set({ status: 'sent', sent_at: new Date(), error: null })
						.where('id', '=', row.id)
						.execute();
				} catch (err) {
					const message = err instanceof Error ? err.message : String(err);
					const last = row.attempts >= MAX_ATTEMPTS;
					console.error(`[mail] delivery of ${row.id} failed (attempt ${row.attempts}${last ? ', giving up' : ''}): ${message}`);
					await opts.db
						.updateTable('mail_outbox')
						.set({
							status: last ? 'failed' : 'queued',
							error: message,
							next_attempt_at: new Date(Date.now() + 60_000 * 2 ** row.attempts)
						})
						.where('id', '=', row.id)
						.execute();
				}
			})
		);
		return rows.rows.length;
	}

	async function loop(): Promise<number> {
		let total = 0;
		do {
			again = false;
			for (let n = await deliverBatch(); n > 0; n = await deliverBatch()) total += n;
		} while (again);
		return total;
	}

	function deliverDue(): Promise<number> {
		if (running) {
			again = true;
			return running;
		}
		running = loop()
			.catch((err) => {
				console.error('[mail] queue:', err instanceof Error ? err.message : err);
				return 0;
			})
			.finally(() => (running = null));
		return running;
	}

	// Not awaited: the caller's answer must not wait for (or reveal anything about) delivery.
	function kick() {
		if (transport) setImmediate(() => void deliverDue());
	}

	const timer = transport ? setInterval(() => void deliverDue(), opts.pollMs ?? 30_000) : null;
	timer?.unref();

	return {
		async queue(db, m) {
			const audience = m.audience ?? 'recipient';
			if (audience === 'organisation' && !m.organisationId) throw new Error('organisation mail needs its organisation');
			await db
				.insertInto('mail_outbox')
				.values({
					organisation_id: m.organisationId ?? null,
					audience,
					purpose: m.purpose,
					to_address: m.to,
					subject: m.subject,
					body_text: m.text
				})
				.execute();
			if (!transport) {
				console.warn(`[mail] SMTP_URL not set; a ${m.purpose} message stays queued in mail_outbox`);
				return;
			}
			if (!db.isTransaction) kick();
		},
		kick,
		deliverDue,
		close() {
			if (timer) clearInterval(timer);
		}
	};
}
