// Demo data: an invented plant operator, "Harrowgate Water Services", and its team.
// Idempotent: running it again changes nothing that exists.
import type { DB } from './index';
import type { Role } from './types';
import { hashPassword } from '../auth/password';
import { seedRegister } from './seed-register';
import { seedSurvey } from './seed-survey';
import { seedStates } from './seed-states';
import type { Storage } from '../storage/index';

export const DEMO_PASSWORD = 'spotface-demo';
export const DEMO_ORG = 'Harrowgate Water Services (demo)';
export const DEMO_USERS: Array<{ email: string; name: string; role: Role }> = [
	{ email: 'admin@harrowgate.example', name: 'Morag Pellow', role: 'admin' },
	{ email: 'engineer@harrowgate.example', name: 'Idris Calloway', role: 'engineer' },
	{ email: 'tech@harrowgate.example', name: 'Senna Okoro', role: 'technician' },
	{ email: 'viewer@harrowgate.example', name: 'Ffion Marsh', role: 'viewer' }
];

export type SeedHook = (db: DB, organisationId: string) => Promise<void>;

/** Seeds the demo organisation and users; later features pass hooks to add their demo rows. */
/**
 * `storage`, when given, also receives a drawn demo picture per machine. `states: false` leaves
 * out the surveys past the site walk (submitted, jobs issued, closed), for tests that take the
 * walking survey through those states themselves.
 */
export async function seedDemo(db: DB, hooks: SeedHook[] = [], opts: { storage?: Storage; states?: boolean } = {}) {
	let org = await db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirst();
	if (!org) org = await db.insertInto('organisation').values({ name: DEMO_ORG }).returning('id').executeTakeFirstOrThrow();
	const hash = await hashPassword(DEMO_PASSWORD);
	for (const u of DEMO_USERS) {
		let user = await db.selectFrom('app_user').select('id').where('email', '=', u.email).executeTakeFirst();
		if (!user) {
			user = await db
				.insertInto('app_user')
				.values({ id: `demo-${u.role}`, email: u.email, name: u.name, password_hash: hash })
				.returning('id')
				.executeTakeFirstOrThrow();
		}
		await db
			.insertInto('member')
			.values({ organisation_id: org.id, user_id: user.id, role: u.role })
			.onConflict((oc) => oc.columns(['organisation_id', 'user_id']).doNothing())
			.execute();
	}
	await seedRegister(db, org.id, opts);
	await seedSurvey(db, org.id);
	if (opts.states !== false) await seedStates(db, org.id, opts);
	for (const hook of hooks) await hook(db, org.id);
	return org.id;
}

/**
 * Drops the demo organisation with everything it owns (every table cascades from the
 * organisation; the demo accounts stay and are made members again) and its stored pictures,
 * then seeds it again. Other organisations are not touched.
 */
export async function resetDemo(db: DB, hooks: SeedHook[] = [], opts: { storage?: Storage; states?: boolean } = {}) {
	const org = await db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirst();
	if (org) {
		const keys = (
			await db.selectFrom('media').select(['original_key', 'display_key', 'thumb_key']).where('organisation_id', '=', org.id).execute()
		).flatMap((m) => [m.original_key, m.display_key, m.thumb_key]);
		await db.deleteFrom('organisation').where('id', '=', org.id).execute();
		if (opts.storage) for (const k of keys) await opts.storage.delete(k).catch(() => undefined);
	}
	return seedDemo(db, hooks, opts);
}
