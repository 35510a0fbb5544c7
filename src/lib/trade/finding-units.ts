/**
 * The unit of a finding's `value` and `limit`, per rule, so a list can print "62 mm (limit
 * 30 mm)" instead of bare numbers. Rules whose findings carry no numbers are left out.
 */
export const FINDING_UNIT: Readonly<Record<string, string>> = {
	'seat.flat-diameter': 'mm',
	'hole.wall-thickness': 'mm',
	'hole.thread-engagement': 'mm',
	'distance.bearing': 'mm',
	'surface.temperature': '°C',
	'machine.speed': 'r/min',
	'mounting.usable-frequency': 'Hz',
	'route.drawn': 'm',
	'route.supply-voltage': 'V',
	'mounting.stud-torque': 'N·m',
	'mounting.pad-cure': 'min',
	'install.supply-voltage': 'V'
};

/** The unit for a rule's numbers, or '' when the rule has none. */
export function findingUnit(rule: string): string {
	return FINDING_UNIT[rule] ?? '';
}
