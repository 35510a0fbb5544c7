import type { DB } from './index';
import type { UnitSystem } from '../../trade';

/** A person's own preferences (not organisation data: a person may belong to several). */
export async function setUnitSystem(db: DB, userId: string, unitSystem: UnitSystem): Promise<void> {
	await db.updateTable('app_user').set({ unit_system: unitSystem }).where('id', '=', userId).execute();
}
