import { fmt } from './inputs';
import { studHoleRequirement, type Material, type Mounting } from './evaluate-point';
import { DEFAULT_THRESHOLDS, type Thresholds } from './thresholds';

export interface SafetyCaution {
	id: string;
	text: string;
}

/** Cautions shown wherever work is planned or recorded. Local codes and site rules come first. */
export const SAFETY_CAUTIONS: readonly SafetyCaution[] = [
	{
		id: 'lockout',
		text: 'Stop, isolate and lock out the machine before preparing a seat, drilling or tapping.'
	},
	{ id: 'eye-protection', text: 'Wear eye protection when grinding and drilling.' },
	{ id: 'qualified-electrical', text: 'Electrical work is done by a qualified person, with the supply off.' },
	{
		id: 'hazardous-area',
		text: 'In a hazardous (explosive) area use equipment certified for the zone and work under a permit.'
	},
	{ id: 'hot-surfaces', text: 'Bearing housings can be hot: check the temperature and wear gloves.' },
	{ id: 'rotating-parts', text: 'Keep yourself, tools and cables clear of rotating parts.' },
	{
		id: 'local-codes',
		text: 'These steps do not replace local codes, site rules or licensed practice; where they differ, those come first.'
	}
];

export type ChecklistPhase = 'before' | 'seat' | 'mount' | 'electrical' | 'after';

export interface ChecklistStep {
	id: string;
	phase: ChecklistPhase;
	text: string;
	/** The rule the step carries out, for "why?" on demand. */
	rule?: string;
	/** Steps that protect people are marked so the job pack can highlight them. */
	safety?: boolean;
}

/**
 * The installation steps for one point, with the organisation's thresholds filled in. The
 * order follows the work: make safe, prepare the seat, mount, connect, commission.
 */
export function installationChecklist(
	mounting: Mounting,
	opts: { thresholds?: Thresholds; material?: Material; hazardousArea?: boolean } = {}
): ChecklistStep[] {
	if (mounting !== 'stud' && mounting !== 'bonded_pad' && mounting !== 'magnet') {
		throw new RangeError(`mounting must be one of "stud", "bonded_pad", "magnet", got ${JSON.stringify(mounting)}`);
	}
	const t = opts.thresholds ?? DEFAULT_THRESHOLDS;
	const hole = studHoleRequirement(opts.material, t);
	const steps: ChecklistStep[] = [];
	const add = (s: ChecklistStep) => steps.push(s);

	if (opts.hazardousArea) {
		add({
			id: 'permit',
			phase: 'before',
			text: 'Hazardous area: confirm the permit and that the sensor, cable and connectors are certified for the zone.',
			rule: 'machine.hazardous-area',
			safety: true
		});
	}
	add({ id: 'lockout', phase: 'before', text: 'Machine stopped, isolated and locked out.', safety: true });
	if (mounting !== 'magnet') {
		add({ id: 'eye-protection', phase: 'before', text: 'Eye protection on for grinding and drilling.', safety: true });
	}

	if (mounting === 'stud') {
		add({
			id: 'spot-face',
			phase: 'seat',
			text: `Grind or spot-face the seat flat and smooth, at least ${fmt(t.minFlatDiameterMm)} mm across.`,
			rule: 'seat.flat-diameter'
		});
		add({
			id: 'drill-tap',
			phase: 'seat',
			text: `Drill the ${hole.tapDrillMm.toFixed(1)} mm tap drill hole ${fmt(hole.holeMm)} mm deep, square to the seat, and tap ${hole.thread} to at least ${fmt(hole.threadMm)} mm of full thread.`,
			rule: 'hole.wall-thickness'
		});
		add({ id: 'clean-hole', phase: 'seat', text: 'Clean out swarf and cutting fluid; degrease the seat.' });
	} else if (mounting === 'bonded_pad') {
		add({
			id: 'grind-seat',
			phase: 'seat',
			text: `Grind the seat clean and flat, at least ${fmt(t.minFlatDiameterMm)} mm across; degrease it.`,
			rule: 'seat.flat-diameter'
		});
		add({
			id: 'bond-pad',
			phase: 'seat',
			text: 'Apply adhesive and activator as the maker states and press the mounting pad on.',
			rule: 'mounting.pad-cure'
		});
		add({
			id: 'cure',
			phase: 'seat',
			text: `Wait at least ${fmt(t.padCureMin, 0)} min (or the maker's cure time, if longer) before loading the pad.`,
			rule: 'mounting.pad-cure'
		});
	} else {
		add({
			id: 'clean-seat',
			phase: 'seat',
			text: `Clean a flat seat at least ${fmt(t.minFlatDiameterMm)} mm across; magnets are for temporary surveys only.`,
			rule: 'mounting.magnet-temporary'
		});
	}

	add({ id: 'couplant', phase: 'mount', text: 'Put a thin film of grease on the seat as couplant.', rule: 'mounting.couplant' });
	add({ id: 'cable-outlet', phase: 'mount', text: 'Mount the sensor with the cable outlet pointing the way the route leaves.' });
	if (mounting !== 'magnet') {
		add({
			id: 'torque',
			phase: 'mount',
			text: `Tighten with a torque wrench to the maker's figure, never above ${fmt(t.studTorqueLimitNm)} N·m.`,
			rule: 'mounting.stud-torque'
		});
	}

	add({ id: 'supply-off', phase: 'electrical', text: 'Supply off before connecting.', safety: true });
	add({
		id: 'measure-supply',
		phase: 'electrical',
		text: `Measure supply voltage and polarity with a meter: ${fmt(t.supplyMinV, 1)}–${fmt(t.supplyMaxV, 1)} V DC.`,
		rule: 'install.supply-voltage',
		safety: true
	});
	add({ id: 'connector', phase: 'electrical', text: 'Lock the connector; cap unused sockets.' });
	add({
		id: 'fix-cable',
		phase: 'electrical',
		text: 'Lay the cable clear of rotating parts and fix it along the route so it cannot swing.',
		rule: 'route.keep-out',
		safety: true
	});

	add({ id: 'power-on', phase: 'after', text: 'Power on and wait until the device reports ready.' });
	add({ id: 'baseline', phase: 'after', text: 'Start the baseline period.' });
	add({ id: 'record', phase: 'after', text: 'Record the as-installed values and a photo of the installed sensor.' });
	return steps;
}
