import type { DB } from './index';

/**
 * Links that act for the recipient (accept an invitation, reset a password, finish a sign-up)
 * are for the mailbox owner only: whoever holds one can create an account under someone else's
 * address, or learn whether that address has an account. The outbox shows the message without them.
 */
export function withoutPersonalLinks(text: string): string {
	return text.replace(/https?:\/\/\S*\/(invite|reset-password|sign-up\/confirm)\/\S+/g, '[link for the recipient only]');
}

/**
 * The organisation's own outgoing mail: only rows its actions sent and marked for it
 * (invitations). Personal mail (password resets, sign-up links, notes to an account's owner)
 * is never listed here, whoever it went to.
 */
export function listForOrganisation(db: DB, organisationId: string, limit = 100) {
	return db
		.selectFrom('mail_outbox')
		.select(['id', 'to_address', 'subject', 'body_text', 'status', 'error', 'created_at', 'sent_at'])
		.where('organisation_id', '=', organisationId)
		.where('audience', '=', 'organisation')
		.orderBy('created_at', 'desc')
		.limit(limit)
		.execute();
}
