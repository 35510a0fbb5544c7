import { assertBearingGeometry, bearingFrequencies, type BearingFrequencies } from './bearing';
import { worstSeverity, type Finding, type Severity } from './findings';
import { fmt, InputReader, isGood } from './inputs';
import {
	finding,
	machineFindings,
	MOUNTING_LABEL,
	pointFindings,
	readMachine,
	readPoint,
	readRoute,
	routeFindings,
	thresholdsForEvaluation,
	type MachineInput,
	type Mounting,
	type PointInput,
	type RouteInput
} from './evaluate-point';
import { usableFrequencyHz, type Thresholds } from './thresholds';

export const DIRECTIONS = ['radial_h', 'radial_v', 'axial'] as const;
export type Direction = (typeof DIRECTIONS)[number];

export const DIRECTION_LABEL: Readonly<Record<Direction, string>> = {
	radial_h: 'radial horizontal',
	radial_v: 'radial vertical',
	axial: 'axial'
};

/** Words for the usual bearing positions; any other position is shown as given. */
export const BEARING_POSITION_LABEL: Readonly<Record<string, string>> = {
	drive_end: 'drive end (DE)',
	non_drive_end: 'non-drive end (NDE)',
	DE: 'drive end (DE)',
	NDE: 'non-drive end (NDE)'
};

export interface BearingInput {
	/** Position on the machine, e.g. 'drive_end' / 'non_drive_end' or 'DE' / 'NDE'; points refer to it. */
	position: string;
	/** Name shown in messages before the word "bearing", e.g. 'fan-side motor'; derived from the position when omitted. */
	label?: string | null;
	/** Monitored bearings need a radial point; true when omitted. */
	monitored?: boolean | null;
	/** Ask for an axial point too (thrust loads, axial faults matter). */
	axialWanted?: boolean | null;
	balls?: number | null;
	ballDiameter?: number | null;
	pitchDiameter?: number | null;
	contactAngleDeg?: number | null;
}

export interface MachinePointInput extends PointInput {
	id: string;
	/** Position of the bearing housing the point is on, matching BearingInput.position. */
	bearing?: string | null;
	direction?: Direction | null;
	route?: RouteInput | null;
}

export interface MachineEvaluationInput {
	machine: MachineInput & {
		bearings?: BearingInput[] | null;
		/** Overrides the computed highest frequency of interest (e.g. gear mesh), Hz. */
		frequencyOfInterestHz?: number | null;
	};
	points: MachinePointInput[];
}

export interface PointResult {
	id: string;
	findings: Finding[];
	worst: Severity;
}

export interface MachineEvaluation {
	/** Findings about the machine as a whole (speed, coverage, bearing data). */
	machine: Finding[];
	/** Findings per point; the machine-level rules are not repeated here. */
	points: PointResult[];
	/** Worst over the machine and all points. */
	worst: Severity;
	bearingFrequencies: Array<{ position: string } & BearingFrequencies>;
	/** Highest frequency of interest used for the mounting check, Hz, when known. */
	frequencyOfInterestHz?: number;
}

function isRadial(d: unknown): boolean {
	return d === 'radial_h' || d === 'radial_v';
}

/**
 * Checks a machine's layout: the machine-level rules once, every point's own rules, that each
 * monitored bearing housing has a radial point (and an axial point where asked), and that each
 * point's mounting reaches the highest frequency of interest (by default the
 * `frequencyOfInterestFactor` × the highest BPFI among the machine's bearings at its speed).
 * Never throws.
 */
export function evaluateMachine(input: MachineEvaluationInput, thresholds?: Partial<Thresholds>): MachineEvaluation {
	const { t, findings: settingFindings } = thresholdsForEvaluation(thresholds);
	const r = new InputReader();
	const machineOut: Finding[] = [];
	const result: MachineEvaluation = { machine: machineOut, points: [], worst: 'pass', bearingFrequencies: [] };
	const finish = () => {
		machineOut.unshift(...settingFindings, ...r.findings.splice(0));
		result.worst = worstSeverity([...machineOut, ...result.points.flatMap((p) => p.findings)]);
		return result;
	};

	const root = r.object('input', 'Machine check input', input, true);
	if (!isGood(root)) return finish();
	const m = readMachine(r, root.machine);
	const rawMachine = (
		typeof root.machine === 'object' && root.machine !== null && !Array.isArray(root.machine) ? root.machine : {}
	) as Record<string, unknown>;
	if (m) machineOut.push(...machineFindings(m, t));

	// Bearings and their defect frequencies.
	const bearingsRaw = rawMachine.bearings ?? [];
	const bearings: Array<{ position: string; name: string; monitored: boolean; axialWanted: boolean }> = [];
	let highestBpfi: number | undefined;
	const missingGeometry: string[] = [];
	if (!Array.isArray(bearingsRaw)) {
		r.invalid('machine.bearings', 'Bearings are not a list');
	} else {
		bearingsRaw.forEach((b: unknown, i: number) => {
			const path = `machine.bearings[${i}]`;
			const o = r.object(path, 'Bearing details', b, true);
			if (!isGood(o)) return;
			if (typeof o.position !== 'string' || o.position.trim() === '') {
				r.invalid(`${path}.position`, 'Bearing position is missing: name it (e.g. DE or NDE)');
				return;
			}
			const monitored = r.flag(`${path}.monitored`, 'Bearing monitored', o.monitored, false);
			const axialWanted = r.flag(`${path}.axialWanted`, 'Axial point wanted', o.axialWanted, false);
			const name = typeof o.label === 'string' && o.label.trim() !== '' ? o.label : (BEARING_POSITION_LABEL[o.position] ?? o.position);
			bearings.push({ position: o.position, name, monitored: monitored !== false, axialWanted: axialWanted === true });
			const geometryFields = ['balls', 'ballDiameter', 'pitchDiameter'] as const;
			const given = geometryFields.filter((k) => o[k] !== undefined && o[k] !== null);
			if (given.length === 0) {
				missingGeometry.push(name);
				return;
			}
			try {
				const g = assertBearingGeometry(
					{
						balls: o.balls,
						ballDiameter: o.ballDiameter,
						pitchDiameter: o.pitchDiameter,
						contactAngleDeg: o.contactAngleDeg ?? undefined
					},
					path
				);
				if (m && isGood(m.speedRpm)) {
					const f = bearingFrequencies(g, m.speedRpm / 60);
					result.bearingFrequencies.push({ position: o.position, ...f });
					highestBpfi = Math.max(highestBpfi ?? 0, f.bpfi);
				}
			} catch (e) {
				r.invalid(path, `Bearing ${name} geometry: ${(e as Error).message}`);
			}
		});
	}

	// Highest frequency of interest.
	const override = r.number('machine.frequencyOfInterestHz', 'Highest frequency of interest', rawMachine.frequencyOfInterestHz, {
		min: 0,
		exclusiveMin: true,
		max: 100_000,
		unit: 'Hz'
	});
	let fMax: number | undefined;
	if (isGood(override)) fMax = override;
	else if (override === undefined && highestBpfi !== undefined) fMax = t.frequencyOfInterestFactor * highestBpfi;
	if (fMax !== undefined) result.frequencyOfInterestHz = fMax;
	if (override === undefined && missingGeometry.length > 0) {
		machineOut.push(
			finding(
				'mounting.usable-frequency',
				'warn',
				`Enter the geometry (number of balls, ball and pitch diameter) of the ${missingGeometry.join(', ')} bearing so the mounting can be checked against its defect frequencies.`
			)
		);
	}

	// Points.
	const pointsRaw = root.points;
	const coverage = new Map<string, Set<string>>();
	if (!Array.isArray(pointsRaw)) {
		r.invalid('points', 'Points are not a list');
	} else {
		pointsRaw.forEach((raw: unknown, i: number) => {
			const pr = new InputReader();
			const path = `points[${i}]`;
			const o = pr.object(path, 'Point details', raw, true);
			const id = isGood(o) && typeof o.id === 'string' && o.id !== '' ? o.id : `#${i + 1}`;
			const out: Finding[] = [];
			if (isGood(o)) {
				if (typeof o.id !== 'string' || o.id === '') pr.invalid(`${path}.id`, 'Point id is missing');
				const p = readPoint(pr, o, path);
				const direction = pr.choice(`${path}.direction`, 'Direction', o.direction, DIRECTIONS, false);
				const route = readRoute(pr, o.route, `${path}.route`);
				if (p) out.push(...pointFindings(p, t));
				out.push(...routeFindings(route, t));
				if (typeof o.bearing === 'string' && isGood(direction)) {
					const set = coverage.get(o.bearing) ?? new Set<string>();
					set.add(direction);
					coverage.set(o.bearing, set);
				}
				if (fMax !== undefined && p && isGood(p.mounting)) out.push(usableFrequencyFinding(p.mounting, fMax, t));
			}
			const findings = [...pr.findings, ...out];
			result.points.push({ id, findings, worst: worstSeverity(findings) });
		});
	}

	// Coverage of bearing housings.
	if (bearings.length === 0 && Array.isArray(bearingsRaw)) {
		machineOut.push(
			finding(
				'direction.radial',
				'warn',
				'No bearings recorded for this machine. Add the bearing positions (drive end, non-drive end) so point coverage can be checked.'
			)
		);
	}
	for (const b of bearings) {
		const dirs = coverage.get(b.position) ?? new Set<string>();
		if (b.monitored) {
			const radial = [...dirs].filter(isRadial);
			machineOut.push(
				radial.length > 0
					? finding(
							'direction.radial',
							'pass',
							`The ${b.name} bearing has a ${radial.map((d) => DIRECTION_LABEL[d as Direction]).join(' and a ')} point.`
						)
					: finding(
							'direction.radial',
							'fail',
							`The ${b.name} bearing has no radial point. Add a radial horizontal or radial vertical point on its housing (points without a direction do not count).`
						)
			);
		}
		if (b.axialWanted) {
			machineOut.push(
				dirs.has('axial')
					? finding('direction.axial', 'pass', `The ${b.name} bearing has an axial point.`)
					: finding(
							'direction.axial',
							'warn',
							`The ${b.name} bearing is marked for thrust monitoring but has no axial point. Add one on its housing.`
						)
			);
		}
	}
	return finish();
}

export function usableFrequencyFinding(mounting: Mounting, fMaxHz: number, t: Thresholds): Finding {
	const usable = usableFrequencyHz(mounting, t);
	const what = `The ${MOUNTING_LABEL[mounting]} is usable to about ${fmt(usable, 0)} Hz; the highest frequency of interest is ${fmt(fMaxHz, 0)} Hz`;
	if (usable >= fMaxHz) return finding('mounting.usable-frequency', 'pass', `${what}.`, { value: fMaxHz, limit: usable });
	const better =
		mounting === 'stud'
			? 'Agree a sensor with a higher range with the vibration engineer.'
			: 'Use a tapped stud mount, which reaches highest.';
	return finding('mounting.usable-frequency', 'fail', `${what}. ${better}`, { value: fMaxHz, limit: usable });
}
