import type { DB } from './index';
import type { Role } from './types';

export function list(db: DB, organisationId: string) {
	return db
		.selectFrom('member')
		.innerJoin('app_user', 'app_user.id', 'member.user_id')
		.select(['member.id', 'member.role', 'member.created_at', 'member.user_id', 'app_user.email', 'app_user.name'])
		.where('member.organisation_id', '=', organisationId)
		.orderBy('app_user.name')
		.execute();
}

export function get(db: DB, organisationId: string, memberId: string) {
	return db
		.selectFrom('member')
		.innerJoin('app_user', 'app_user.id', 'member.user_id')
		.select(['member.id', 'member.role', 'member.created_at', 'member.user_id', 'app_user.email', 'app_user.name'])
		.where('member.organisation_id', '=', organisationId)
		.where('member.id', '=', memberId)
		.executeTakeFirst();
}

export function findForUser(db: DB, organisationId: string, userId: string) {
	return db
		.selectFrom('member')
		.innerJoin('organisation', 'organisation.id', 'member.organisation_id')
		.select(['member.id', 'member.role', 'organisation.name as organisation_name'])
		.where('member.organisation_id', '=', organisationId)
		.where('member.user_id', '=', userId)
		.executeTakeFirst();
}

export class LastAdminError extends Error {
	constructor() {
		super('An organisation needs at least one admin: make another member admin first.');
	}
}

async function countAdmins(db: DB, organisationId: string) {
	const r = await db
		.selectFrom('member')
		.select((eb) => eb.fn.countAll<string>().as('n'))
		.where('organisation_id', '=', organisationId)
		.where('role', '=', 'admin')
		.executeTakeFirstOrThrow();
	return Number(r.n);
}

/** Change a role; refuses to demote the last admin. Runs in a transaction with a row lock. */
export async function changeRole(db: DB, organisationId: string, memberId: string, role: Role) {
	return db.transaction().execute(async (trx) => {
		// Serialise admin changes per organisation so two demotions cannot race past the check.
		await trx.selectFrom('organisation').select('id').where('id', '=', organisationId).forUpdate().execute();
		const m = await trx
			.selectFrom('member')
			.select(['id', 'role'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', memberId)
			.executeTakeFirst();
		if (!m) return null;
		if (m.role === 'admin' && role !== 'admin' && (await countAdmins(trx, organisationId)) <= 1) {
			throw new LastAdminError();
		}
		await trx.updateTable('member').set({ role }).where('id', '=', memberId).execute();
		return { ...m, role };
	});
}

export async function remove(db: DB, organisationId: string, memberId: string) {
	return db.transaction().execute(async (trx) => {
		await trx.selectFrom('organisation').select('id').where('id', '=', organisationId).forUpdate().execute();
		const m = await trx
			.selectFrom('member')
			.select(['id', 'role', 'user_id'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', memberId)
			.executeTakeFirst();
		if (!m) return null;
		if (m.role === 'admin' && (await countAdmins(trx, organisationId)) <= 1) throw new LastAdminError();
		await trx.deleteFrom('member').where('id', '=', memberId).execute();
		// Sessions in this organisation end with the membership.
		await trx.deleteFrom('user_session').where('user_id', '=', m.user_id).where('organisation_id', '=', organisationId).execute();
		return m;
	});
}
