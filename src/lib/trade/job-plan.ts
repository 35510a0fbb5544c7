// Planning the installation work for a set of approved points: the seat each point needs,
// whether the machine must be stopped and locked out, the tools and the bill of materials.
// Pure: the jobs module feeds it rows, the job pack prints what it returns.
import { DEFAULT_CONDUCTOR_CLASS, type ConductorClass } from './cable';
import { installationChecklist, type ChecklistStep } from './checklist';
import { MOUNTING_LABEL, MOUNTINGS, MATERIALS, MATERIAL_LABEL, studHoleRequirement, type Material, type Mounting } from './evaluate-point';
import { fmt } from './inputs';
import { DEFAULT_THRESHOLDS, type Thresholds } from './thresholds';

/**
 * Cable bought over the measured route length: 15 % for the drip loop and service loop at
 * the sensor, the run into the cabinet, terminations and routing around what the photo did
 * not show (common practice). Each run is then rounded up to the whole metre.
 */
export const CABLE_MARGIN = 0.15;

/**
 * Cable ties or clips: one every 0.3 m along the run, plus one at each end. BS 7671 guidance
 * (On-Site Guide, Table D1, from memory) spaces supports for small cables 250 mm horizontally
 * and 400 mm vertically; 0.3 m is between the two (common practice).
 */
export const CABLE_FIXING_SPACING_M = 0.3;

/** Pads one two-part adhesive kit bonds (assumed; check the coverage the adhesive maker states). */
export const PADS_PER_ADHESIVE_KIT = 10;

/** Seats one tube of couplant grease covers with a thin film (assumed; a film takes well under a gram). */
export const SEATS_PER_COUPLANT_TUBE = 20;

/** Conductors terminated at the supply end of each run, each with a wire-end ferrule (2-wire 24 V DC supply). */
export const CONDUCTORS_PER_RUN = 2;

/** The seat preparation one point needs, by mounting method (fields that do not apply are null). */
export interface SeatPreparation {
	mounting: Mounting | null;
	/** Diameter to spot-face or grind flat, mm. */
	spotFaceDiameterMm: number | null;
	/** Tapped stud: thread, tap drill, hole depth, full-thread depth and the engagement the housing material needs. */
	thread: string | null;
	tapDrillMm: number | null;
	holeDepthMm: number | null;
	threadDepthMm: number | null;
	threadEngagementMm: number | null;
	/** Bonded pad: pad, adhesive and the minimum cure wait before loading the pad. */
	pad: string | null;
	adhesive: string | null;
	cureWaitMin: number | null;
}

/** One point of a job as the planning functions need it. */
export interface JobPlanPoint {
	/** Shown in notes (e.g. "P3"); optional. */
	label?: string | null;
	mounting: Mounting | null | undefined;
	material?: Material | null;
	/** Measured one-way route length to the supply point, m; null when no route is drawn. */
	cableLengthM?: number | null;
	crossSectionMm2?: number | null;
	conductorClass?: ConductorClass | null;
	hazardousArea?: boolean | null;
}

export interface MaterialLine {
	item: string;
	quantity: number;
	unit: string;
	note?: string;
}

export interface LockoutDecision {
	required: boolean;
	/** Why, one line per reason ("P1: drilling and tapping for a stud"). */
	reasons: string[];
}

const isMounting = (m: unknown): m is Mounting => (MOUNTINGS as readonly unknown[]).includes(m);
const isMaterial = (m: unknown): m is Material => (MATERIALS as readonly unknown[]).includes(m);
const validLength = (l: unknown): l is number => typeof l === 'number' && Number.isFinite(l) && l >= 0;
const nameOf = (p: JobPlanPoint, i: number) => (p.label && String(p.label).trim()) || `point ${i + 1}`;

const EMPTY_PREPARATION: SeatPreparation = {
	mounting: null,
	spotFaceDiameterMm: null,
	thread: null,
	tapDrillMm: null,
	holeDepthMm: null,
	threadDepthMm: null,
	threadEngagementMm: null,
	pad: null,
	adhesive: null,
	cureWaitMin: null
};

/** Pad and adhesive as the pack names them; the maker's instructions decide the product. */
export const BONDED_PAD_ITEM = 'Mounting pad with M6 thread, flat base';
export const PAD_ADHESIVE_ITEM = 'Two-part structural adhesive (with activator if the maker calls for one)';

/**
 * The seat a point needs. Stud: spot-face, tap drill, hole and full-thread depth with the
 * engagement the housing material needs (`studHoleRequirement`); while the material is
 * unknown the minimum thread depth is given and the engagement is null. Bonded pad: ground
 * seat, pad, adhesive, cure wait. Magnet: a clean flat seat, nothing machined.
 */
export function seatPreparation(
	mounting: Mounting | null | undefined,
	opts: { material?: Material | null; thresholds?: Thresholds } = {}
): SeatPreparation {
	const t = opts.thresholds ?? DEFAULT_THRESHOLDS;
	if (!isMounting(mounting)) return { ...EMPTY_PREPARATION };
	if (mounting === 'stud') {
		const hole = studHoleRequirement(isMaterial(opts.material) ? opts.material : undefined, t);
		return {
			...EMPTY_PREPARATION,
			mounting,
			spotFaceDiameterMm: t.minFlatDiameterMm,
			thread: hole.thread,
			tapDrillMm: hole.tapDrillMm,
			holeDepthMm: hole.holeMm,
			threadDepthMm: hole.threadMm,
			threadEngagementMm: hole.engagementMm
		};
	}
	if (mounting === 'bonded_pad') {
		return {
			...EMPTY_PREPARATION,
			mounting,
			spotFaceDiameterMm: t.minFlatDiameterMm,
			pad: BONDED_PAD_ITEM,
			adhesive: PAD_ADHESIVE_ITEM,
			cureWaitMin: t.padCureMin
		};
	}
	return { ...EMPTY_PREPARATION, mounting };
}

/** One line for a table cell: what to do to the seat. */
export function preparationSummary(prep: SeatPreparation, opts: { material?: Material | null; thresholds?: Thresholds } = {}): string {
	const t = opts.thresholds ?? DEFAULT_THRESHOLDS;
	switch (prep.mounting) {
		case 'stud': {
			const parts = [
				`Spot-face Ø${fmt(prep.spotFaceDiameterMm ?? t.minFlatDiameterMm)} mm`,
				`drill Ø${(prep.tapDrillMm ?? 0).toFixed(1)} × ${fmt(prep.holeDepthMm ?? 0)} mm`,
				`tap ${prep.thread} × ${fmt(prep.threadDepthMm ?? 0)} mm full thread`
			];
			const material = isMaterial(opts.material) ? opts.material : null;
			parts.push(
				prep.threadEngagementMm === null
					? 'housing material not recorded: confirm it before drilling'
					: `${fmt(prep.threadEngagementMm)} mm engagement${material ? ` in ${MATERIAL_LABEL[material]}` : ''}`
			);
			return parts.join('; ');
		}
		case 'bonded_pad':
			return `Grind flat Ø${fmt(prep.spotFaceDiameterMm ?? t.minFlatDiameterMm)} mm; bond pad; cure at least ${fmt(prep.cureWaitMin ?? t.padCureMin, 0)} min before loading`;
		case 'magnet':
			return `Clean a flat seat Ø${fmt(t.minFlatDiameterMm)} mm; no machining (magnets are for temporary points)`;
		default:
			return 'Mounting method not chosen: decide it before the work starts';
	}
}

/** Torque limit for the sensor on its stud or pad, N·m; null for a magnet or no mounting. */
export function torqueLimitNm(mounting: Mounting | null | undefined, t: Thresholds = DEFAULT_THRESHOLDS): number | null {
	return mounting === 'stud' || mounting === 'bonded_pad' ? t.studTorqueLimitNm : null;
}

/**
 * Whether the machine must be stopped, isolated and locked out for the job: always when a
 * point is drilled and tapped (stud) and when a seat is ground for a pad (machining on the
 * machine, next to its rotating parts); also when the engineer asks for it. A point without
 * a mounting method counts as a stud, the most demanding case, until it is decided.
 */
export function lockoutRequired(points: readonly JobPlanPoint[], opts: { requested?: boolean } = {}): LockoutDecision {
	const reasons: string[] = [];
	if (opts.requested) reasons.push('Asked for by the engineer.');
	points.forEach((p, i) => {
		const name = nameOf(p, i);
		if (p.mounting === 'stud') reasons.push(`${name}: drilling and tapping the stud hole.`);
		else if (p.mounting === 'bonded_pad') reasons.push(`${name}: grinding the seat for the bonded pad.`);
		else if (!isMounting(p.mounting)) reasons.push(`${name}: mounting method not chosen, so drilling is assumed.`);
	});
	return { required: reasons.length > 0, reasons };
}

/** The installation checklist for one point of a job ([] until its mounting method is chosen). */
export function pointChecklist(point: JobPlanPoint, t: Thresholds = DEFAULT_THRESHOLDS): ChecklistStep[] {
	if (!isMounting(point.mounting)) return [];
	return installationChecklist(point.mounting, {
		thresholds: t,
		material: isMaterial(point.material) ? point.material : undefined,
		hazardousArea: point.hazardousArea === true
	});
}

/** Tools for a set of points, in the order the work uses them, each once. */
export function jobTools(points: readonly JobPlanPoint[], opts: { lockout?: boolean; thresholds?: Thresholds } = {}): string[] {
	const t = opts.thresholds ?? DEFAULT_THRESHOLDS;
	const has = (m: Mounting) => points.some((p) => p.mounting === m);
	const stud = has('stud');
	const pad = has('bonded_pad');
	const magnet = has('magnet');
	const hazardous = points.some((p) => p.hazardousArea === true);
	const lockout = opts.lockout ?? lockoutRequired(points).required;
	const hole = studHoleRequirement(undefined, t);
	const tools: string[] = [];
	if (hazardous) tools.push('Gas detector and the tools the permit calls for (certified for the zone)');
	if (lockout) tools.push('Personal lockout padlocks and tags');
	if (stud || pad) tools.push('Eye protection, gloves and hearing protection');
	tools.push('Contact or infrared thermometer (surface temperature before touching)');
	if (stud) {
		tools.push(`Spot-face cutter or grinder for a Ø${fmt(t.minFlatDiameterMm)} mm flat seat`);
		tools.push('Centre punch and hammer');
		tools.push(`Drill with depth stop and a ${hole.tapDrillMm.toFixed(1)} mm drill bit`);
		tools.push(`${hole.thread} taps (taper and bottoming), tap wrench and cutting fluid`);
		tools.push('Depth gauge');
		tools.push('Swarf magnet or vacuum (no compressed air near the bearing)');
	}
	if (pad && !stud) tools.push(`Grinder or sanding disc for a Ø${fmt(t.minFlatDiameterMm)} mm flat seat`);
	if (pad) tools.push('Adhesive applicator or mixing nozzle, and a timer for the cure wait');
	if (stud || pad || magnet) tools.push('Degreaser and lint-free cloths');
	if (stud || pad) tools.push(`Torque wrench covering up to ${fmt(t.studTorqueLimitNm)} N·m`);
	if (points.length > 0) {
		tools.push('Cable cutter, wire stripper and ferrule crimping tool');
		tools.push('Multimeter (DC voltage and polarity at the sensor end)');
		tools.push('Camera or tablet for the as-installed photos');
	}
	return tools;
}

/** Description of a conductor for the pack and the bill of materials, e.g. "2-core 0.75 mm² class 5". */
export function conductorLabel(crossSectionMm2: number | null | undefined, conductorClass?: ConductorClass | null): string | null {
	if (typeof crossSectionMm2 !== 'number' || !Number.isFinite(crossSectionMm2) || crossSectionMm2 <= 0) return null;
	return `${CONDUCTORS_PER_RUN}-core ${fmt(crossSectionMm2, 2)} mm² class ${conductorClass ?? DEFAULT_CONDUCTOR_CLASS}`;
}

/** Cable to cut for one measured run: the length plus the margin, rounded up to the whole metre. */
export function cableToCutM(lengthM: number, margin = CABLE_MARGIN): number {
	if (!validLength(lengthM)) throw new RangeError(`lengthM must be a number of metres ≥ 0, got ${String(lengthM)}`);
	if (!(typeof margin === 'number' && Number.isFinite(margin) && margin >= 0 && margin <= 2)) {
		throw new RangeError(`margin must be a fraction between 0 and 2, got ${String(margin)}`);
	}
	// Rounding error guard: 10 m × 1.1 is 11.000000000000002 in floating point, which is 11 m to cut.
	return Math.max(0, Math.ceil(lengthM * (1 + margin) - 1e-9));
}

/** Ties or clips for one cut length of cable: one every CABLE_FIXING_SPACING_M, plus one at each end. */
export function cableFixings(cutLengthM: number): number {
	if (!validLength(cutLengthM)) throw new RangeError(`cutLengthM must be a number of metres ≥ 0, got ${String(cutLengthM)}`);
	return Math.max(0, Math.ceil(cutLengthM / CABLE_FIXING_SPACING_M - 1e-9)) + 1;
}

function listNames(names: string[], max = 12): string {
	return names.length <= max ? names.join(', ') : `${names.slice(0, max).join(', ')} and ${names.length - max} more`;
}

/**
 * Bill of materials summed over a job's points: sensors, mounting hardware by method,
 * adhesive, couplant, cable per conductor (measured length plus `margin`, each run rounded up
 * to the metre), ties, connectors and ferrules. Lines with nothing to buy are left out; points
 * with missing data are named in the notes, never silently counted as zero.
 */
export function billOfMaterials(points: readonly JobPlanPoint[], opts: { margin?: number } = {}): MaterialLine[] {
	const margin = opts.margin ?? CABLE_MARGIN;
	if (!(Number.isFinite(margin) && margin >= 0 && margin <= 2))
		throw new RangeError(`margin must be a fraction between 0 and 2, got ${margin}`);
	const names = points.map(nameOf);
	const by = (m: Mounting) => points.map((p, i) => (p.mounting === m ? names[i] : null)).filter((n): n is string => n !== null);
	const studs = by('stud');
	const pads = by('bonded_pad');
	const magnets = by('magnet');
	const undecided = points.map((p, i) => (isMounting(p.mounting) ? null : names[i])).filter((n): n is string => n !== null);

	const lines: MaterialLine[] = [];
	const add = (item: string, quantity: number, unit: string, note?: string) => {
		if (quantity > 0) lines.push(note ? { item, quantity, unit, note } : { item, quantity, unit });
	};
	add(
		'Vibration sensor, 24 V DC',
		points.length,
		'pcs',
		`One per point: ${listNames(names)}.${undecided.length ? ` Mounting not chosen for ${listNames(undecided)}.` : ''}`
	);
	add('M6 mounting stud', studs.length, 'pcs', `Tapped-hole mounts: ${listNames(studs)}.`);
	add(BONDED_PAD_ITEM, pads.length, 'pcs', `Bonded mounts: ${listNames(pads)}.`);
	add(
		PAD_ADHESIVE_ITEM,
		Math.ceil(pads.length / PADS_PER_ADHESIVE_KIT),
		'kit',
		`One kit per ${PADS_PER_ADHESIVE_KIT} pads (assumed; check the maker's coverage and shelf life).`
	);
	add(`Mounting magnet (${MOUNTING_LABEL.magnet})`, magnets.length, 'pcs', `Temporary mounts: ${listNames(magnets)}.`);
	add(
		'Couplant grease',
		Math.ceil(points.length / SEATS_PER_COUPLANT_TUBE),
		'tube',
		`Thin film on each of ${points.length} seat${points.length === 1 ? '' : 's'}; one tube per ${SEATS_PER_COUPLANT_TUBE} seats (assumed).`
	);

	// Cable per conductor, in the order conductors first appear.
	const groups = new Map<string, { measuredM: number; cutM: number; runs: number; fixings: number }>();
	const noLength: string[] = [];
	const noConductor: string[] = [];
	points.forEach((p, i) => {
		if (!validLength(p.cableLengthM)) {
			noLength.push(names[i]);
			return;
		}
		const label = conductorLabel(p.crossSectionMm2, p.conductorClass);
		if (!label) noConductor.push(names[i]);
		const key = label ?? `${CONDUCTORS_PER_RUN}-core cable, conductor size not chosen`;
		const g = groups.get(key) ?? { measuredM: 0, cutM: 0, runs: 0, fixings: 0 };
		const cut = cableToCutM(p.cableLengthM, margin);
		g.measuredM += p.cableLengthM;
		g.cutM += cut;
		g.runs += 1;
		g.fixings += cableFixings(cut);
		groups.set(key, g);
	});
	const pct = `${fmt(margin * 100, 1)} %`;
	let runs = 0;
	let fixings = 0;
	for (const [label, g] of groups) {
		runs += g.runs;
		fixings += g.fixings;
		add(
			`Sensor cable, ${label}`,
			g.cutM,
			'm',
			`${g.runs} run${g.runs === 1 ? '' : 's'}, ${fmt(g.measuredM, 1)} m measured + ${pct} margin, each run rounded up to the metre.${
				label.includes('not chosen') ? ` Choose the conductor for ${listNames(noConductor)}.` : ''
			}`
		);
	}
	if (noLength.length) {
		lines.push({
			item: 'Sensor cable, length not measured',
			quantity: 0,
			unit: 'm',
			note: `No cable route length for ${listNames(noLength)}: measure the route and add the cable.`
		});
	}
	add(
		'Cable ties or clips',
		fixings,
		'pcs',
		`One every ${fmt(CABLE_FIXING_SPACING_M * 1000, 0)} mm along each cut length plus one at each end; fix the cable clear of rotating parts.`
	);
	add('Sensor cable connector, sensor end', points.length, 'pcs', 'One per sensor; cap unused sockets.');
	add('Wire-end ferrules', runs * CONDUCTORS_PER_RUN, 'pcs', `${CONDUCTORS_PER_RUN} per run at the supply terminals.`);
	return lines;
}

export interface JobPlanPointResult {
	preparation: SeatPreparation;
	summary: string;
	torqueLimitNm: number | null;
	conductor: string | null;
	checklist: ChecklistStep[];
}

export interface JobPlan {
	points: JobPlanPointResult[];
	lockout: LockoutDecision;
	tools: string[];
	materials: MaterialLine[];
	cableMargin: number;
}

/** Everything the plan says about a job's points at once (same order as the input). */
export function planJob(
	points: readonly JobPlanPoint[],
	opts: { thresholds?: Thresholds; margin?: number; lockoutRequested?: boolean } = {}
): JobPlan {
	const t = opts.thresholds ?? DEFAULT_THRESHOLDS;
	const cableMargin = opts.margin ?? CABLE_MARGIN;
	const lockout = lockoutRequired(points, { requested: opts.lockoutRequested });
	return {
		points: points.map((p) => {
			const material = isMaterial(p.material) ? p.material : null;
			const preparation = seatPreparation(p.mounting, { material, thresholds: t });
			return {
				preparation,
				summary: preparationSummary(preparation, { material, thresholds: t }),
				torqueLimitNm: torqueLimitNm(p.mounting, t),
				conductor: conductorLabel(p.crossSectionMm2, p.conductorClass),
				checklist: pointChecklist(p, t)
			};
		}),
		lockout,
		tools: jobTools(points, { lockout: lockout.required, thresholds: t }),
		materials: billOfMaterials(points, { margin: cableMargin }),
		cableMargin
	};
}
