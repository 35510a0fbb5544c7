import { sql } from 'kysely';
import type { DB } from './index';

export function get(db: DB, organisationId: string) {
	return db.selectFrom('organisation').selectAll().where('id', '=', organisationId).executeTakeFirst();
}

export function update(db: DB, organisationId: string, patch: { name?: string }) {
	return db.updateTable('organisation').set(patch).where('id', '=', organisationId).returningAll().executeTakeFirst();
}

export async function getSettings(db: DB, organisationId: string): Promise<Record<string, unknown>> {
	const row = await db.selectFrom('organisation').select('settings').where('id', '=', organisationId).executeTakeFirst();
	return (row?.settings as Record<string, unknown>) ?? {};
}

/** Replace one top-level key of the settings document, leaving the others alone. */
export async function setSetting(db: DB, organisationId: string, key: string, value: unknown) {
	await db
		.updateTable('organisation')
		.set({ settings: sql`jsonb_set(settings, ${'{' + key + '}'}::text[], ${JSON.stringify(value)}::jsonb, true)` })
		.where('id', '=', organisationId)
		.execute();
}
