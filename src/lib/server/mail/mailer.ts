import nodemailer, { type Transporter } from 'nodemailer';
import type { DB } from '../db';

export interface Mailer {
	send(db: DB, m: { organisationId: string | null; to: string; subject: string; text: string }): Promise<void>;
}

/**
 * Every message is written to mail_outbox first, then handed to SMTP; the row records the
 * outcome so a failed delivery is visible and can be retried instead of vanishing.
 */
export function createMailer(opts: { smtpUrl?: string; from: string }): Mailer {
	const transport: Transporter | null = opts.smtpUrl
		? nodemailer.createTransport(opts.smtpUrl)
		: null;
	return {
		async send(db, m) {
			const row = await db
				.insertInto('mail_outbox')
				.values({ organisation_id: m.organisationId, to_address: m.to, subject: m.subject, body_text: m.text })
				.returning('id')
				.executeTakeFirstOrThrow();
			if (!transport) {
				console.warn(`[mail] SMTP_URL not set; message to ${m.to} kept in mail_outbox (${m.subject})`);
				return;
			}
			try {
				await transport.sendMail({ from: opts.from, to: m.to, subject: m.subject, text: m.text });
				await db
					.updateTable('mail_outbox')
					.set({ status: 'sent', sent_at: new Date(), attempts: 1 })
					.where('id', '=', row.id)
					.execute();
			} catch (err) {
				const message = err instanceof Error ? err.message : String(err);
				console.error(`[mail] delivery to ${m.to} failed: ${message}`);
				await db
					.updateTable('mail_outbox')
					.set({ status: 'failed', error: message, attempts: 1 })
					.where('id', '=', row.id)
					.execute();
			}
		}
	};
}
