// The signed-in person's unit system, for components that show or read measurements. Read it
// inside a component (or a $derived) so a change of preference reaches the page.
import { page } from '$app/state';
import { isUnitSystem, parseQuantity, restateInUserUnits, type Quantity, type UnitSystem } from './trade';

export function userUnitSystem(): UnitSystem {
	const s = (page.data as { viewer?: { unitSystem?: unknown } }).viewer?.unitSystem;
	return isUnitSystem(s) ? s : 'metric';
}

/**
 * Wraps a field's commit (which takes SI text) so the person types in their unit: the text is
 * read in their unit, turned into SI and handed on; a message in their unit comes back on bad input.
 */
export function commitInUnits(q: Quantity, system: UnitSystem, commit: (si: string) => string | null, label?: string) {
	return (raw: string): string | null => {
		const parsed = parseQuantity(q, raw, system, label);
		if (!parsed.ok) return parsed.message;
		const err = commit(parsed.si === null ? '' : String(parsed.si));
		return err === null ? null : restateInUserUnits(err, system);
	};
}
