// Tokens for the JSON API, for a person (acts as that member, with their current role) or a
// named service (its own account without a password, acting with the role the admin chose).
// The secret is shown once; only its SHA-256 is stored. Read-only tokens never write.
import { randomBytes, randomUUID } from 'node:crypto';
import type { DB } from '../db/index';
import type { ApiToken, ServiceRole } from '../db/integration-types';
import type { Role } from '../db/types';
import type { Viewer } from './lucia';
import { hashToken } from './tokens';
import { record } from '../db/audit';
import * as members from '../db/members';
import type { TokenCreate } from '../../schemas/integration';

export const TOKEN_PREFIX = 'spf_';
/** Service accounts get an address under the reserved .invalid domain: no mail, no sign-in. */
const SERVICE_DOMAIN = 'service.spotface.invalid';
/** Not an argon2 hash: a service account can never sign in with a password. */
const NO_PASSWORD = '!service-account-no-password';

export class TokenError extends Error {
	constructor(
		readonly field: string,
		message: string
	) {
		super(message);
	}
}

export type TokenViewer = Viewer & { token: NonNullable<Viewer['token']> };

export async function createToken(
	db: DB,
	organisationId: string,
	actorUserId: string,
	input: TokenCreate
): Promise<{ secret: string; token: ApiToken }> {
	const secret = TOKEN_PREFIX + randomBytes(32).toString('base64url');
	const expiresAt = new Date(Date.now() + input.expiresInDays * 86_400_000);
	return db.transaction().execute(async (trx) => {
		let userId: string;
		if (input.kind === 'person') {
			const m = await members.findForUser(trx, organisationId, input.userId);
			if (!m) throw new TokenError('userId', 'Choose a member of your organisation.');
			userId = input.userId;
		} else {
			userId = `svc-${randomUUID()}`;
			await trx
				.insertInto('app_user')
				.values({ id: userId, email: `${userId}@${SERVICE_DOMAIN}`, name: input.name, password_hash: NO_PASSWORD })
				.execute();
		}
		const token = await trx
			.insertInto('api_token')
			.values({
				organisation_id: organisationId,
				kind: input.kind,
				user_id: userId,
				name: input.name,
				role: input.kind === 'service' ? (input.role as ServiceRole) : null,
				scope: input.scope,
				token_hash: hashToken(secret),
				prefix: secret.slice(0, TOKEN_PREFIX.length + 6),
				created_by: actorUserId,
				expires_at: expiresAt
			})
			.returningAll()
			.executeTakeFirstOrThrow();
		await record(trx, {
			organisationId,
			actorUserId,
			action: 'api_token.created',
			subjectType: 'api_token',
			subjectId: token.id,
			data: { kind: input.kind, name: input.name, scope: input.scope, expiresAt: expiresAt.toISOString() }
		});
		return { secret, token };
	});
}

export function listTokens(db: DB, organisationId: string) {
	return db
		.selectFrom('api_token')
		.innerJoin('app_user', 'app_user.id', 'api_token.user_id')
		.leftJoin('member', (j) =>
			j.onRef('member.user_id', '=', 'api_token.user_id').onRef('member.organisation_id', '=', 'api_token.organisation_id')
		)
		.select([
			'api_token.id',
			'api_token.kind',
			'api_token.name',
			'api_token.role',
			'api_token.scope',
			'api_token.prefix',
			'api_token.created_at',
			'api_token.expires_at',
			'api_token.revoked_at',
			'api_token.last_used_at',
			'app_user.name as acts_as',
			'member.role as member_role'
		])
		.where('api_token.organisation_id', '=', organisationId)
		.orderBy('api_token.created_at', 'desc')
		.execute();
}

/** Revokes a token of the organisation; false when there is none (or it was revoked already). */
export async function revokeToken(db: DB, organisationId: string, id: string, actorUserId: string): Promise<boolean> {
	const r = await db
		.updateTable('api_token')
		.set({ revoked_at: new Date(), revoked_by: actorUserId })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.where('revoked_at', 'is', null)
		.returning('id')
		.executeTakeFirst();
	if (r) await record(db, { organisationId, actorUserId, action: 'api_token.revoked', subjectType: 'api_token', subjectId: id });
	return Boolean(r);
}

export type BearerLookup = { ok: true; viewer: TokenViewer } | { ok: false; message: string };

/** Who is behind an `Authorization` header. Every refusal says why, without telling which tokens exist. */
export async function viewerFromAuthorization(db: DB, header: string): Promise<BearerLookup> {
	const m = /^Bearer[ ]+([A-Za-z0-9_\-.~+/]+=*)\s*$/i.exec(header);
	if (!m) return { ok: false, message: 'Send the token as "Authorization: Bearer <token>".' };
	const secret = m[1];
	const row = await db
		.selectFrom('api_token')
		.innerJoin('app_user', 'app_user.id', 'api_token.user_id')
		.innerJoin('organisation', 'organisation.id', 'api_token.organisation_id')
		.select([
			'api_token.id',
			'api_token.organisation_id',
			'api_token.kind',
			'api_token.user_id',
			'api_token.role',
			'api_token.scope',
			'api_token.expires_at',
			'api_token.revoked_at',
			'app_user.email',
			'app_user.name',
			'app_user.unit_system',
			'organisation.name as organisation_name'
		])
		.where('api_token.token_hash', '=', hashToken(secret))
		.executeTakeFirst();
	if (!row) return { ok: false, message: 'This token is not known. Ask an admin for a token.' };
	if (row.revoked_at) return { ok: false, message: 'This token was revoked. Ask an admin for a new token.' };
	if (new Date(row.expires_at).getTime() <= Date.now()) {
		return { ok: false, message: `This token expired on ${new Date(row.expires_at).toISOString()}. Ask an admin for a new token.` };
	}
	let role: Role | null = row.role;
	if (row.kind === 'person') {
		const member = await members.findForUser(db, row.organisation_id, row.user_id);
		if (!member) return { ok: false, message: 'The person this token acts for is no longer a member of the organisation.' };
		role = member.role;
	}
	// At most one write a minute per token: the time is for people, not an access log.
	await db
		.updateTable('api_token')
		.set({ last_used_at: new Date() })
		.where('id', '=', row.id)
		.where((eb) => eb.or([eb('last_used_at', 'is', null), eb('last_used_at', '<', new Date(Date.now() - 60_000))]))
		.execute();
	return {
		ok: true,
		viewer: {
			userId: row.user_id,
			email: row.email,
			name: row.name,
			organisationId: row.organisation_id,
			organisationName: row.organisation_name,
			role: role!,
			sessionId: '',
			unitSystem: row.unit_system === 'us' ? 'us' : 'metric',
			token: { id: row.id, scope: row.scope, kind: row.kind }
		}
	};
}
