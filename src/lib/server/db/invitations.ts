import type { DB } from './index';

export function listOpen(db: DB, organisationId: string) {
	return db
		.selectFrom('invitation')
		.select(['id', 'email', 'role', 'expires_at', 'created_at'])
		.where('organisation_id', '=', organisationId)
		.where('accepted_at', 'is', null)
		.where('revoked_at', 'is', null)
		.where('expires_at', '>', new Date())
		.orderBy('created_at', 'desc')
		.execute();
}

export function get(db: DB, organisationId: string, id: string) {
	return db
		.selectFrom('invitation')
		.select(['id', 'email', 'role', 'expires_at', 'created_at', 'accepted_at', 'revoked_at'])
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.executeTakeFirst();
}

export async function revoke(db: DB, organisationId: string, id: string) {
	const r = await db
		.updateTable('invitation')
		.set({ revoked_at: new Date() })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.where('accepted_at', 'is', null)
		.where('revoked_at', 'is', null)
		.returning('id')
		.executeTakeFirst();
	return Boolean(r);
}
