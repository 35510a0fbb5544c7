// The signed-in person's unit system, for components that show or read measurements. Read it
// inside a component (or a $derived) so a change of preference reaches the page.
import { page } from '$app/state';
import { isUnitSystem, type UnitSystem } from './trade';

export function userUnitSystem(): UnitSystem {
	const s = (page.data as { viewer?: { unitSystem?: unknown } }).viewer?.unitSystem;
	return isUnitSystem(s) ? s : 'metric';
}
