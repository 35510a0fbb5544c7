import type { ThresholdKey } from '$lib/trade';

export interface ThresholdGroup {
	id: string;
	title: string;
	intro: string;
	keys: ThresholdKey[];
}

/** How the settings page groups the thresholds; every threshold appears in exactly one group. */
export const THRESHOLD_GROUPS: readonly ThresholdGroup[] = [
	{
		id: 'seat',
		title: 'Seat and hole',
		intro: 'The flat seat under the sensor base and the tapped hole for an M6 stud.',
		keys: [
			'minFlatDiameterMm',
			'minWallThicknessStudMm',
			'minThreadDepthMm',
			'threadEngagementSteel',
			'threadEngagementCastIron',
			'threadEngagementAluminium'
		]
	},
	{
		id: 'distance',
		title: 'Distance to the bearing',
		intro: 'A point further away than the first value needs a check; further than the second, it fails.',
		keys: ['distanceWarnMm', 'distanceFailMm']
	},
	{
		id: 'speed',
		title: 'Machine speed',
		intro: 'Below this steady speed a standard sensor is a poor fit (low-speed machine).',
		keys: ['minSpeedRpm']
	},
	{
		id: 'temperature',
		title: 'Surface temperature',
		intro: 'Set this to the rated maximum of the sensor you fit.',
		keys: ['maxSurfaceTempC']
	},
	{
		id: 'supply',
		title: 'Supply',
		intro: 'The 24 V DC supply window at the sensor end of the cable, and the current one sensor draws.',
		keys: ['nominalSupplyV', 'supplyMinV', 'supplyMaxV', 'sensorCurrentA']
	},
	{
		id: 'frequency',
		title: 'Mounting frequency ranges',
		intro: 'How high each mounting method can be trusted. The order must fall from stud, to bonded pad, to magnet, to hand-held probe.',
		keys: ['usableFreqStudHz', 'usableFreqPadFraction', 'usableFreqMagnetHz', 'usableFreqHandHeldHz', 'frequencyOfInterestFactor']
	},
	{
		id: 'install',
		title: 'Installation',
		intro: 'Limits the installer works to and records on the job.',
		keys: ['studTorqueLimitNm', 'padCureMin']
	}
];
