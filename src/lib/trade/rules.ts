import type { Firmness, ThresholdKey } from './thresholds';

export type RuleKind = 'check' | 'instruction';
export type RuleScope = 'point' | 'route' | 'machine' | 'install' | 'input';

export interface RuleInfo {
	id: string;
	title: string;
	/** Why the rule exists and what to do, in a sentence or two. Shown on demand. */
	explanation: string;
	reference: string;
	firmness: Firmness;
	/** 'check' rules produce findings; 'instruction' rules go into the job pack. */
	kind: RuleKind;
	scope: RuleScope;
	/** Thresholds the rule reads, so the settings page can link them. */
	thresholds: readonly ThresholdKey[];
}

const RULE_LIST = [
	{
		id: 'surface.solid-metal',
		title: 'Sensor on solid metal',
		explanation:
			'Mount on a bearing housing, pedestal or solid casting. Sheet-metal covers, guards, fan cowls and thin fins vibrate on their own and damp or distort the signal from the bearing.',
		reference:
			'Common practice; ISO 10816-1 / 20816-1 and ISO 13373-1 say to measure on bearing housings or pedestals, not on covers (from memory)',
		firmness: 'common practice',
		kind: 'check',
		scope: 'point',
		thresholds: []
	},
	{
		id: 'seat.flat-diameter',
		title: 'Flat seat big enough for the sensor base',
		explanation:
			'The sensor base needs a flat, smooth seat (a spot face) at least as wide as the base so it sits without rocking; a small or curved seat lowers the mounted resonance.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'point',
		thresholds: ['minFlatDiameterMm']
	},
	{
		id: 'hole.wall-thickness',
		title: 'Wall thick enough for a tapped stud hole',
		explanation:
			'An M6 stud needs a tapped hole about 15 mm deep with at least 9 mm of full thread, so the wall must be at least that thick. On a thinner wall, bond a mounting pad instead of drilling through.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'point',
		thresholds: ['minWallThicknessStudMm', 'minThreadDepthMm']
	},
	{
		id: 'hole.thread-engagement',
		title: 'Thread engagement in the housing material',
		explanation:
			'Softer materials need more thread: about 1.0 × d in steel, 1.25–1.5 × d in cast iron and 2 × d in aluminium. For an M6 stud in aluminium that is 12 mm of thread and a deeper hole.',
		reference: 'Common practice (machine-design tables)',
		firmness: 'common practice',
		kind: 'check',
		scope: 'point',
		thresholds: [
			'threadEngagementSteel',
			'threadEngagementCastIron',
			'threadEngagementAluminium',
			'minThreadDepthMm',
			'minWallThicknessStudMm'
		]
	},
	{
		id: 'mounting.magnet-temporary',
		title: 'Magnets for temporary surveys only',
		explanation:
			'A magnet mount can shift, collect swarf and has a lower usable frequency range. Use it for temporary surveys; for a permanent point use a stud or a bonded pad.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'point',
		thresholds: []
	},
	{
		id: 'distance.bearing',
		title: 'Close to the bearing',
		explanation:
			'Put the sensor as close to the bearing load zone as possible, with a short, stiff path to it. Every joint and every extra millimetre of metal weakens the high-frequency signal from the bearing.',
		reference: 'Common practice: no standard gives a number, so the limits are configurable',
		firmness: 'common practice',
		kind: 'check',
		scope: 'point',
		thresholds: ['distanceWarnMm', 'distanceFailMm']
	},
	{
		id: 'surface.temperature',
		title: 'Surface temperature within the sensor rating',
		explanation:
			"The seat must stay below the sensor's rated maximum temperature while the machine runs. Hot surfaces are also a burn hazard for the installer.",
		reference: "The sensor's rating; default limit from memory, configurable",
		firmness: 'from memory',
		kind: 'check',
		scope: 'point',
		thresholds: ['maxSurfaceTempC']
	},
	{
		id: 'direction.radial',
		title: 'A radial point on every monitored bearing housing',
		explanation:
			'Each monitored bearing housing needs at least one radial point (horizontal or vertical) to see unbalance, misalignment and bearing faults.',
		reference: 'ISO 10816-1 / 13373-1 name radial horizontal, radial vertical and axial directions (from memory)',
		firmness: 'from memory',
		kind: 'check',
		scope: 'machine',
		thresholds: []
	},
	{
		id: 'direction.axial',
		title: 'An axial point where thrust faults matter',
		explanation:
			'Where thrust loads or axial faults matter (thrust bearings, misalignment-prone couplings), add an axial point on that bearing housing.',
		reference: 'ISO 10816-1 / 13373-1 name radial horizontal, radial vertical and axial directions (from memory)',
		firmness: 'from memory',
		kind: 'check',
		scope: 'machine',
		thresholds: []
	},
	{
		id: 'machine.speed',
		title: 'Machine speed suits standard sensors',
		explanation:
			'Standard sensors suit machines running steadily at 600 r/min or more. Slower machines need low-frequency sensors and longer measurement times.',
		reference: 'Kim, Tan & Kosse 2008, Australian Journal of Mechanical Engineering 6(1):61–68',
		firmness: 'published',
		kind: 'check',
		scope: 'machine',
		thresholds: ['minSpeedRpm']
	},
	{
		id: 'machine.speed-signal',
		title: 'Speed signal on variable-speed machines',
		explanation:
			'On a variable-speed machine the fault frequencies move with speed. Wire in a speed signal (tachometer or drive output) so readings can be compared.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'machine',
		thresholds: []
	},
	{
		id: 'mounting.usable-frequency',
		title: 'Mounting reaches the frequencies of interest',
		explanation:
			'Mounted resonance falls from stud, to bonded pad, to magnet, to hand-held probe. The mounting must stay usable up to the highest frequency of interest (by default 3 × the highest inner-race defect frequency).',
		reference: "Harris' Shock and Vibration Handbook (ordering published; figures from memory, configurable)",
		firmness: 'from memory',
		kind: 'check',
		scope: 'point',
		thresholds: ['usableFreqStudHz', 'usableFreqPadFraction', 'usableFreqMagnetHz', 'usableFreqHandHeldHz', 'frequencyOfInterestFactor']
	},
	{
		id: 'machine.hazardous-area',
		title: 'Hazardous area',
		explanation:
			'In a hazardous (explosive) area the sensor, cable and supply must be certified for the zone and the work needs a permit. Follow the site rules and local codes.',
		reference: 'Common practice; local codes and site rules come first',
		firmness: 'common practice',
		kind: 'check',
		scope: 'machine',
		thresholds: []
	},
	{
		id: 'route.drawn',
		title: 'Cable route drawn',
		explanation: 'Each point needs a cable route to a 24 V DC supply point so the installer knows the cable length and path.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'route',
		thresholds: []
	},
	{
		id: 'route.keep-out',
		title: 'Cable clear of rotating parts',
		explanation:
			'The cable route must not enter or touch a keep-out zone around shafts, couplings, belts or fans. A cable caught by a rotating part can injure someone and destroy the sensor.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'route',
		thresholds: []
	},
	{
		id: 'route.fixing',
		title: 'Cable fixed so it cannot swing',
		explanation:
			'Fix the cable along its route with clips or ties so it cannot swing: a loose cable rubs through, adds noise and can reach rotating parts.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'route',
		thresholds: []
	},
	{
		id: 'route.supply-voltage',
		title: 'Supply voltage at the sensor within range',
		explanation:
			'A 24 V DC supply loses voltage along the cable (two conductors, go and return). The voltage at the sensor end must stay within the allowed range; a longer run needs a thicker conductor or a closer supply.',
		reference:
			'IEC 61131-2 for the 24 V DC range (percentages from memory); IEC 60228 conductor resistance; IEC 60028 temperature coefficient',
		firmness: 'from memory',
		kind: 'check',
		scope: 'route',
		thresholds: ['supplyMinV', 'supplyMaxV', 'nominalSupplyV', 'sensorCurrentA']
	},
	{
		id: 'mounting.couplant',
		title: 'Couplant on the seat',
		explanation: 'Put a thin film of grease between the sensor base and the seat to improve high-frequency transmission.',
		reference: 'Common practice; ISO 5348 recommends a couplant (from memory)',
		firmness: 'common practice',
		kind: 'instruction',
		scope: 'install',
		thresholds: []
	},
	{
		id: 'mounting.stud-torque',
		title: 'Stud tightening torque',
		explanation:
			"Tighten with a torque wrench to the sensor maker's figure and never above the limit; overtightening distorts the base and strips threads.",
		reference: 'Common practice; bolt torque tables (VDI 2230) do not apply to sensor studs',
		firmness: 'common practice',
		kind: 'check',
		scope: 'install',
		thresholds: ['studTorqueLimitNm']
	},
	{
		id: 'mounting.pad-cure',
		title: 'Pad adhesive cure time',
		explanation: 'Use the adhesive and activator the maker states and let it cure for the full time before mounting the sensor.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'instruction',
		scope: 'install',
		thresholds: ['padCureMin']
	},
	{
		id: 'install.supply-voltage',
		title: 'Measured supply voltage at the sensor',
		explanation: 'Measure the supply voltage at the sensor connector with a meter before connecting; it must be within the allowed range.',
		reference: 'IEC 61131-2 (percentages from memory)',
		firmness: 'from memory',
		kind: 'check',
		scope: 'install',
		thresholds: ['supplyMinV', 'supplyMaxV']
	},
	{
		id: 'install.polarity',
		title: 'Supply polarity',
		explanation: 'Check the supply polarity with a meter before connecting the sensor.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'install',
		thresholds: []
	},
	{
		id: 'install.deviation',
		title: 'Deviation from the approved plan',
		explanation:
			'Work that differs from the approved plan (another mounting method, another place) is recorded with what changed and why, so the engineer can accept it or have it put right.',
		reference: 'Common practice (as-installed records)',
		firmness: 'common practice',
		kind: 'check',
		scope: 'install',
		thresholds: []
	},
	{
		id: 'install.ready',
		title: 'Device reported ready',
		explanation: 'After powering on, wait until the device reports ready and record the time; only then is it measuring.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'install',
		thresholds: []
	},
	{
		id: 'install.baseline',
		title: 'Start of the baseline period',
		explanation:
			'The baseline (the readings later ones are compared with) starts once the device is ready and the machine runs normally; record when it started.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'install',
		thresholds: []
	},
	{
		id: 'install.photo',
		title: 'Photo of the installed sensor',
		explanation: 'A photo of the sensor as fitted, with its cable outlet and the first fixings, shows later what was done.',
		reference: 'Common practice',
		firmness: 'common practice',
		kind: 'check',
		scope: 'install',
		thresholds: []
	},
	{
		id: 'input.invalid',
		title: 'Values that cannot be right',
		explanation:
			'A value is missing its number, is not a number, or is outside any sensible range. Correct it; the rules that need it cannot be checked until then.',
		reference: 'Spotface input checks',
		firmness: 'common practice',
		kind: 'check',
		scope: 'input',
		thresholds: []
	}
] as const satisfies readonly RuleInfo[];

export type RuleId = (typeof RULE_LIST)[number]['id'];

export const RULES: readonly RuleInfo[] = RULE_LIST;

export const RULES_BY_ID: Readonly<Record<RuleId, RuleInfo>> = Object.fromEntries(RULE_LIST.map((r) => [r.id, r])) as unknown as Record<
	RuleId,
	RuleInfo
>;

export function ruleInfo(id: string): RuleInfo | undefined {
	return (RULES_BY_ID as Record<string, RuleInfo>)[id];
}
