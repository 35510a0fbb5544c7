// Rule thresholds per organisation. Only the values that differ from DEFAULT_THRESHOLDS are
// stored (organisation.settings → 'thresholds'), so a corrected default reaches every
// organisation that never changed it.
import { DEFAULT_THRESHOLDS, safeResolveThresholds, type ThresholdIssue, type ThresholdKey, type Thresholds } from '../../trade';
import { validateThresholdOverrides, type ThresholdErrors } from '../../schemas/thresholds';
import type { DB } from './index';
import { getSettings, setSetting } from './organisations';
import { record } from './audit';

const SETTINGS_KEY = 'thresholds';

export interface OrganisationThresholds {
	/** The values the rule engine uses: defaults with the overrides applied. */
	effective: Thresholds;
	/** The stored overrides (only keys that differ from the defaults). */
	overrides: Partial<Thresholds>;
	/**
	 * Problems with the stored overrides (e.g. a default changed so an old override now breaks an
	 * ordering). When there are any, the defaults are in force until someone saves again.
	 */
	issues: ThresholdIssue[];
}

function storedOverrides(settings: Record<string, unknown>): Record<string, unknown> {
	const raw = settings[SETTINGS_KEY];
	return typeof raw === 'object' && raw !== null && !Array.isArray(raw) ? (raw as Record<string, unknown>) : {};
}

export async function getThresholds(db: DB, organisationId: string): Promise<OrganisationThresholds> {
	const stored = storedOverrides(await getSettings(db, organisationId));
	const resolved = safeResolveThresholds(stored);
	if (!resolved.ok) {
		return { effective: { ...DEFAULT_THRESHOLDS }, overrides: stored as Partial<Thresholds>, issues: resolved.issues };
	}
	return { effective: resolved.thresholds, overrides: stored as Partial<Thresholds>, issues: [] };
}

export type SaveResult = ({ ok: true } & OrganisationThresholds) | { ok: false; errors: ThresholdErrors };

function changes(before: Thresholds, after: Thresholds) {
	const out: Partial<Record<ThresholdKey, { from: number; to: number }>> = {};
	for (const k of Object.keys(after) as ThresholdKey[]) {
		if (before[k] !== after[k]) out[k] = { from: before[k], to: after[k] };
	}
	return out;
}

/**
 * Replaces the organisation's overrides with `input` (keys left out go back to their
 * defaults). Nothing is stored when any value is invalid.
 */
export async function saveThresholds(db: DB, organisationId: string, input: unknown, actor: { userId: string }): Promise<SaveResult> {
	const v = validateThresholdOverrides(input);
	if (!v.ok) return v;
	return db.transaction().execute(async (trx) => {
		const before = await getThresholds(trx, organisationId);
		await setSetting(trx, organisationId, SETTINGS_KEY, v.overrides);
		const after = await getThresholds(trx, organisationId);
		const changed = changes(before.effective, after.effective);
		if (Object.keys(changed).length) {
			await record(trx, {
				organisationId,
				actorUserId: actor.userId,
				action: 'thresholds.saved',
				subjectType: 'organisation',
				subjectId: organisationId,
				data: { changed }
			});
		}
		return { ok: true as const, ...after };
	});
}

/** Removes every override: all thresholds go back to their defaults. */
export async function resetThresholds(db: DB, organisationId: string, actor: { userId: string }): Promise<OrganisationThresholds> {
	return db.transaction().execute(async (trx) => {
		const before = await getThresholds(trx, organisationId);
		await setSetting(trx, organisationId, SETTINGS_KEY, {});
		await record(trx, {
			organisationId,
			actorUserId: actor.userId,
			action: 'thresholds.reset',
			subjectType: 'organisation',
			subjectId: organisationId,
			data: { previousOverrides: before.overrides }
		});
		return getThresholds(trx, organisationId);
	});
}
