// Sign-up, sign-in, password reset and invitations. Used by form actions and API routes alike.
import { generateIdFromEntropySize } from 'lucia';
import type { DB } from '../db';
import type { Role } from '../db/types';
import { hashPassword, verifyPassword } from './password';
import { hashToken, newToken } from './tokens';
import { record } from '../db/audit';
import type { Mailer } from '../mail/mailer';

export const RESET_TTL_MS = 60 * 60 * 1000; // one hour
export const INVITE_TTL_MS = 7 * 24 * 60 * 60 * 1000; // seven days
export const SIGN_UP_TTL_MS = 24 * 60 * 60 * 1000; // one day

export class AccountError extends Error {
	constructor(
		message: string,
		readonly field?: string,
		readonly status = 400
	) {
		super(message);
	}
}

/** A wrong password for an existing account (counts toward the sign-in slowdown). */
export class WrongPasswordError extends AccountError {
	constructor() {
		super('That is not the password of your existing account.', 'password', 400);
	}
}

function findUserByEmail(db: DB, email: string) {
	return db
		.selectFrom('app_user')
		.selectAll()
		.where((eb) => eb(eb.fn('lower', ['email']), '=', email.toLowerCase()))
		.executeTakeFirst();
}

/**
 * Sign-up answers the same whether or not the address has an account, so the form cannot be used
 * to find out who uses Spotface: a new address gets a link that creates the organisation and
 * the account (proving the address is theirs); the owner of a known address gets a note instead.
 * Both hash the password and queue one message, so they also take the same time.
 */
export async function requestSignUp(
	db: DB,
	mailer: Mailer,
	origin: string,
	input: { organisationName: string; name: string; email: string; password: string }
) {
	const passwordHash = await hashPassword(input.password);
	const user = await findUserByEmail(db, input.email);
	if (user) {
		await mailer.queue(db, {
			purpose: 'sign-up-existing',
			to: user.email,
			subject: 'Someone tried to sign up to Spotface with your address',
			text:
				`Hello ${user.name},\n\nSomeone tried to create a Spotface organisation with this e-mail address, ` +
				`but you already have an account.\n\nSign in: ${origin}/sign-in\n` +
				`Forgot your password? ${origin}/forgot-password\n\nIf it was not you, ignore this message; nothing was changed.\n`
		});
		return;
	}
	const { token, hash } = newToken();
	// One transaction, one commit: the same as the single insert above.
	await db.transaction().execute(async (trx) => {
		await trx
			.insertInto('sign_up_request')
			.values({
				email: input.email,
				name: input.name,
				organisation_name: input.organisationName,
				password_hash: passwordHash,
				token_hash: hash,
				expires_at: new Date(Date.now() + SIGN_UP_TTL_MS)
			})
			.execute();
		await mailer.queue(trx, {
			purpose: 'sign-up',
			to: input.email,
			subject: 'Finish creating your Spotface organisation',
			text:
				`Hello ${input.name},\n\nOpen this link within 24 hours to create ${input.organisationName} on Spotface ` +
				`and sign in (it works once):\n\n${origin}/sign-up/confirm/${token}\n\n` +
				`If it was not you, ignore this message; nothing is created.\n`
		});
	});
	mailer.kick();
}

export function findUsableSignUp(db: DB, token: string) {
	return db
		.selectFrom('sign_up_request')
		.select(['email', 'name', 'organisation_name'])
		.where('token_hash', '=', hashToken(token))
		.where('used_at', 'is', null)
		.where('expires_at', '>', new Date())
		.executeTakeFirst();
}

/** Creates the organisation and its first admin from a sign-up link. Single use. */
export async function confirmSignUp(db: DB, token: string) {
	try {
		return await db.transaction().execute(async (trx) => {
			const req = await trx
				.updateTable('sign_up_request')
				.set({ used_at: new Date() })
				.where('token_hash', '=', hashToken(token))
				.where('used_at', 'is', null)
				.where('expires_at', '>', new Date())
				.returningAll()
				.executeTakeFirst();
			if (!req) throw new AccountError('This link has expired or was already used. Sign up again.', 'token', 410);
			// Only the owner of the mailbox holds this link, so saying so reveals nothing.
			if (await findUserByEmail(trx, req.email)) {
				throw new AccountError('You already have an account with this e-mail address. Sign in instead.', 'token', 409);
			}
			const org = await trx
				.insertInto('organisation')
				.values({ name: req.organisation_name })
				.returning(['id', 'name'])
				.executeTakeFirstOrThrow();
			const userId = generateIdFromEntropySize(10);
			await trx.insertInto('app_user').values({ id: userId, email: req.email, name: req.name, password_hash: req.password_hash }).execute();
			await trx.insertInto('member').values({ organisation_id: org.id, user_id: userId, role: 'admin' }).execute();
			await record(trx, { organisationId: org.id, actorUserId: userId, action: 'organisation.created' });
			return { userId, organisationId: org.id };
		});
	} catch (e) {
		if ((e as { code?: string }).code === '23505') {
			throw new AccountError('You already have an account with this e-mail address. Sign in instead.', 'token', 409);
		}
		throw e;
	}
}

/** Returns the user and the organisation to open, or null for a wrong e-mail or password. */
export async function checkCredentials(db: DB, email: string, password: string) {
	const user = await findUserByEmail(db, email);
	if (!user) {
		// Spend the same time as a real check so timing does not reveal which e-mails exist.
		await verifyPassword('$argon2id$v=19$m=19456,t=2,p=1$c29tZXNhbHRzb21lc2FsdA$2tcsjuYCUnA8MHl2RsNBoL2vCEwa3H8Kh1tFxBn0Q6Q', password);
		return null;
	}
	if (!(await verifyPassword(user.password_hash, password))) return null;
	const membership = await db
		.selectFrom('member')
		.select(['organisation_id'])
		.where('user_id', '=', user.id)
		.orderBy('created_at')
		.executeTakeFirst();
	if (!membership) return null;
	return { userId: user.id, organisationId: membership.organisation_id };
}

/**
 * Does the same work whether or not the address has an account (one lookup, one queued message,
 * nothing awaited from the mail server), so neither the answer nor its timing tells them apart.
 */
export async function requestPasswordReset(db: DB, mailer: Mailer, origin: string, email: string) {
	const user = await findUserByEmail(db, email);
	if (!user) {
		await mailer.queue(db, {
			purpose: 'reset-no-account',
			to: email,
			subject: 'Reset your Spotface password',
			text:
				`Someone asked to reset the password of a Spotface account for this e-mail address, ` +
				`but no account uses it.\n\nIf it was you, you may have signed up with another address; ` +
				`or ask an admin of your organisation to invite you.\nIf it was not you, ignore this message.\n`
		});
		return;
	}
	const { token, hash } = newToken();
	// One transaction, one commit: the same as the single insert above.
	await db.transaction().execute(async (trx) => {
		await trx
			.insertInto('password_reset')
			.values({ user_id: user.id, token_hash: hash, expires_at: new Date(Date.now() + RESET_TTL_MS) })
			.execute();
		// Personal mail: never listed in any organisation's outbox.
		await mailer.queue(trx, {
			purpose: 'password-reset',
			to: user.email,
			subject: 'Reset your Spotface password',
			text:
				`Hello ${user.name},\n\nSomeone asked to reset the password of your Spotface account.\n` +
				`Open this link within one hour to choose a new password (it works once):\n\n` +
				`${origin}/reset-password/${token}\n\nIf it was not you, ignore this message; your password stays as it is.\n`
		});
	});
	mailer.kick();
}

export async function findUsableReset(db: DB, token: string) {
	return db
		.selectFrom('password_reset')
		.selectAll()
		.where('token_hash', '=', hashToken(token))
		.where('used_at', 'is', null)
		.where('expires_at', '>', new Date())
		.executeTakeFirst();
}

/** Sets the new password and ends every session of the user. Single use. */
export async function resetPassword(db: DB, token: string, password: string) {
	const passwordHash = await hashPassword(password);
	return db.transaction().execute(async (trx) => {
		const used = await trx
			.updateTable('password_reset')
			.set({ used_at: new Date() })
			.where('token_hash', '=', hashToken(token))
			.where('used_at', 'is', null)
			.where('expires_at', '>', new Date())
			.returning(['user_id'])
			.executeTakeFirst();
		if (!used) throw new AccountError('This reset link has expired or was already used. Ask for a new one.', 'token', 410);
		await trx.updateTable('app_user').set({ password_hash: passwordHash }).where('id', '=', used.user_id).execute();
		await trx.deleteFrom('user_session').where('user_id', '=', used.user_id).execute();
		await record(trx, { organisationId: null, actorUserId: used.user_id, action: 'user.password-reset' });
		return used.user_id;
	});
}

export async function invite(
	db: DB,
	mailer: Mailer,
	origin: string,
	input: { organisationId: string; organisationName: string; invitedBy: { id: string; name: string }; email: string; role: Role }
) {
	const existing = await db
		.selectFrom('member')
		.innerJoin('app_user', 'app_user.id', 'member.user_id')
		.select('member.id')
		.where('member.organisation_id', '=', input.organisationId)
		.where((eb) => eb(eb.fn('lower', ['app_user.email']), '=', input.email.toLowerCase()))
		.executeTakeFirst();
	if (existing) throw new AccountError('This person is already a member.', 'email', 409);
	const { token, hash } = newToken();
	const inv = await db.transaction().execute(async (trx) => {
		// A new invitation to the same address replaces an open one.
		await trx
			.updateTable('invitation')
			.set({ revoked_at: new Date() })
			.where('organisation_id', '=', input.organisationId)
			.where((eb) => eb(eb.fn('lower', ['email']), '=', input.email.toLowerCase()))
			.where('accepted_at', 'is', null)
			.where('revoked_at', 'is', null)
			.execute();
		const row = await trx
			.insertInto('invitation')
			.values({
				organisation_id: input.organisationId,
				email: input.email,
				role: input.role,
				token_hash: hash,
				invited_by: input.invitedBy.id,
				expires_at: new Date(Date.now() + INVITE_TTL_MS)
			})
			.returning(['id', 'email', 'role', 'expires_at', 'created_at'])
			.executeTakeFirstOrThrow();
		await record(trx, {
			organisationId: input.organisationId,
			actorUserId: input.invitedBy.id,
			action: 'invitation.created',
			subjectType: 'invitation',
			subjectId: row.id,
			data: { email: input.email, role: input.role }
		});
		return row;
	});
	// The inviting organisation's own mail: its admins may read it in their outbox.
	await mailer.queue(db, {
		purpose: 'invitation',
		audience: 'organisation',
		organisationId: input.organisationId,
		to: input.email,
		subject: `You are invited to ${input.organisationName} on Spotface`,
		text:
			`${input.invitedBy.name} invited you to join ${input.organisationName} on Spotface as ${input.role}.\n\n` +
			`Open this link within seven days to accept:\n\n${origin}/invite/${token}\n`
	});
	return inv;
}

export function findOpenInvitation(db: DB, token: string) {
	return db
		.selectFrom('invitation')
		.innerJoin('organisation', 'organisation.id', 'invitation.organisation_id')
		.select([
			'invitation.id',
			'invitation.email',
			'invitation.role',
			'invitation.organisation_id',
			'organisation.name as organisation_name'
		])
		.where('invitation.token_hash', '=', hashToken(token))
		.where('invitation.accepted_at', 'is', null)
		.where('invitation.revoked_at', 'is', null)
		.where('invitation.expires_at', '>', new Date())
		.executeTakeFirst();
}

/**
 * Accept an invitation. A new person gives a name and password; someone who already has an
 * account proves it with their password. Returns the user and organisation for the session.
 */
export async function acceptInvitation(db: DB, token: string, input: { name?: string; password: string }) {
	const inv = await findOpenInvitation(db, token);
	if (!inv) throw new AccountError('This invitation has expired, was withdrawn or was already used.', 'token', 410);
	const user = await findUserByEmail(db, inv.email);
	let userId: string;
	if (user) {
		if (!(await verifyPassword(user.password_hash, input.password))) {
			throw new WrongPasswordError();
		}
		userId = user.id;
	} else {
		if (!input.name) throw new AccountError('Enter your name.', 'name');
		if (input.password.length < 10) throw new AccountError('Use at least 10 characters.', 'password');
		userId = generateIdFromEntropySize(10);
	}
	const passwordHash = user ? null : await hashPassword(input.password);
	await db.transaction().execute(async (trx) => {
		const claimed = await trx
			.updateTable('invitation')
			.set({ accepted_at: new Date() })
			.where('id', '=', inv.id)
			.where('accepted_at', 'is', null)
			.where('revoked_at', 'is', null)
			.returning('id')
			.executeTakeFirst();
		if (!claimed) throw new AccountError('This invitation was already used.', 'token', 410);
		if (!user) {
			await trx.insertInto('app_user').values({ id: userId, email: inv.email, name: input.name!, password_hash: passwordHash! }).execute();
		}
		await trx
			.insertInto('member')
			.values({ organisation_id: inv.organisation_id, user_id: userId, role: inv.role })
			.onConflict((oc) => oc.columns(['organisation_id', 'user_id']).doNothing())
			.execute();
		await record(trx, {
			organisationId: inv.organisation_id,
			actorUserId: userId,
			action: 'invitation.accepted',
			subjectType: 'invitation',
			subjectId: inv.id
		});
	});
	return { userId, organisationId: inv.organisation_id };
}
