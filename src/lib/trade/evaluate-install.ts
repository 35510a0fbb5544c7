import { worstSeverity, type Finding, type Severity } from './findings';
import { fmt, InputReader, isGood } from './inputs';
import { finding, MOUNTING_LABEL, MOUNTINGS, thresholdsForEvaluation, type Mounting } from './evaluate-point';
import type { Thresholds } from './thresholds';

/** What the technician records per point when the sensor is fitted. */
export interface InstalledRecordInput {
	mounting: Mounting;
	/** Torque applied to the stud, N·m. */
	torqueNm?: number | null;
	/** Supply voltage measured at the sensor connector, V. */
	supplyV?: number | null;
	/** Polarity checked with a meter and found correct. */
	polarityOk?: boolean | null;
	/**
	 * The fields below are checked only when the caller passes them (a job's record does; a
	 * quick check of torque and supply does not). null means "not recorded yet".
	 */
	/** The mounting method the approved plan asked for. */
	plannedMounting?: Mounting | null;
	/** When the device reported ready, and when the baseline period started (ISO 8601 or Date). */
	readyAt?: string | Date | null;
	baselineStartAt?: string | Date | null;
	/** What was done differently from the plan, and why. */
	deviation?: string | null;
	deviationReason?: string | null;
	/** Whether a photo of the installed sensor was taken. */
	photo?: boolean | null;
}

function timeOf(v: string | Date | null | undefined): number | null | undefined {
	if (v === undefined) return undefined;
	if (v === null || v === '') return null;
	const ms = v instanceof Date ? v.getTime() : Date.parse(v);
	return Number.isFinite(ms) ? ms : Number.NaN;
}

const blank = (v: unknown) => typeof v !== 'string' || v.trim() === '';

/** Findings on the plan and the commissioning times (see InstalledRecordInput). */
function planFindings(o: Record<string, unknown>, mounting: Mounting | undefined): Finding[] {
	const out: Finding[] = [];
	const planned = o.plannedMounting as Mounting | null | undefined;
	const deviation = o.deviation as string | null | undefined;
	const reason = o.deviationReason as string | null | undefined;
	const methodDiffers = planned != null && mounting !== undefined && mounting !== planned;
	if (planned !== undefined || deviation !== undefined) {
		if ((methodDiffers || !blank(deviation)) && blank(reason)) {
			out.push(
				finding(
					'install.deviation',
					'fail',
					methodDiffers
						? `Mounted with ${MOUNTING_LABEL[mounting!].toLowerCase()} where the plan says ${MOUNTING_LABEL[planned!].toLowerCase()}: say why.`
						: 'A deviation from the plan needs its reason.'
				)
			);
		} else if (methodDiffers || !blank(deviation)) {
			out.push(
				finding(
					'install.deviation',
					'warn',
					`Deviation from the plan: ${(deviation ?? '').trim() || 'method changed'} (${(reason ?? '').trim()}).`
				)
			);
		}
	}
	const ready = timeOf(o.readyAt as string | Date | null | undefined);
	const baseline = timeOf(o.baselineStartAt as string | Date | null | undefined);
	if (ready !== undefined) {
		if (ready === null) out.push(finding('install.ready', 'warn', 'Power on and record the time the device reported ready.'));
		else if (Number.isNaN(ready)) out.push(finding('install.ready', 'fail', 'The ready time is not a valid date and time.'));
		else out.push(finding('install.ready', 'pass', 'Device reported ready.'));
	}
	if (baseline !== undefined) {
		if (baseline === null) out.push(finding('install.baseline', 'warn', 'Start the baseline period and record when it started.'));
		else if (Number.isNaN(baseline)) out.push(finding('install.baseline', 'fail', 'The baseline start is not a valid date and time.'));
		else if (typeof ready === 'number' && !Number.isNaN(ready) && baseline < ready) {
			out.push(
				finding(
					'install.baseline',
					'fail',
					'The baseline started before the device reported ready: start it again once the device is ready.'
				)
			);
		} else out.push(finding('install.baseline', 'pass', 'Baseline period started.'));
	}
	if (o.photo !== undefined) {
		out.push(
			o.photo === true
				? finding('install.photo', 'pass', 'Photo of the installed sensor taken.')
				: finding('install.photo', 'warn', 'Take a photo of the installed sensor.')
		);
	}
	return out;
}

/**
 * Checks an as-installed record: stud torque within the limit, the measured supply voltage
 * within range, polarity confirmed. A value not recorded is a 'warn' naming what to record.
 */
export function evaluateInstalled(
	record: InstalledRecordInput,
	thresholds?: Partial<Thresholds>
): { findings: Finding[]; worst: Severity } {
	const { t, findings: settingFindings } = thresholdsForEvaluation(thresholds);
	const r = new InputReader();
	const out: Finding[] = [];
	const o = r.object('record', 'As-installed record', record, true);
	if (isGood(o)) {
		const mounting = r.choice('record.mounting', 'Mounting used', o.mounting, MOUNTINGS, true);
		const torque = r.number('record.torqueNm', 'Torque applied', o.torqueNm, { min: 0, max: 500, unit: 'N·m' });
		const volts = r.number('record.supplyV', 'Measured supply voltage', o.supplyV, { min: 0, max: 1000, unit: 'V' });
		const polarity = r.flag('record.polarityOk', 'Polarity checked', o.polarityOk, false);

		if (mounting === 'stud') {
			if (torque === undefined) {
				out.push(
					finding('mounting.stud-torque', 'warn', `Record the torque applied to the stud (limit ${fmt(t.studTorqueLimitNm)} N·m).`, {
						limit: t.studTorqueLimitNm
					})
				);
			} else if (isGood(torque)) {
				out.push(
					torque > t.studTorqueLimitNm
						? finding(
								'mounting.stud-torque',
								'fail',
								`${fmt(torque)} N·m is above the ${fmt(t.studTorqueLimitNm)} N·m limit. Check the sensor base and the thread for damage, and refit to the maker's torque.`,
								{ value: torque, limit: t.studTorqueLimitNm }
							)
						: finding('mounting.stud-torque', 'pass', `Tightened to ${fmt(torque)} N·m (limit ${fmt(t.studTorqueLimitNm)} N·m).`, {
								value: torque,
								limit: t.studTorqueLimitNm
							})
				);
			}
		}
		if (volts === undefined) {
			out.push(finding('install.supply-voltage', 'warn', 'Measure and record the supply voltage at the sensor connector.'));
		} else if (isGood(volts)) {
			const inRange = volts >= t.supplyMinV && volts <= t.supplyMaxV;
			out.push(
				inRange
					? finding(
							'install.supply-voltage',
							'pass',
							`${fmt(volts, 2)} V at the sensor (${fmt(t.supplyMinV, 1)}–${fmt(t.supplyMaxV, 1)} V).`,
							{
								value: volts,
								limit: volts < t.nominalSupplyV ? t.supplyMinV : t.supplyMaxV
							}
						)
					: finding(
							'install.supply-voltage',
							'fail',
							`${fmt(volts, 2)} V at the sensor is outside ${fmt(t.supplyMinV, 1)}–${fmt(t.supplyMaxV, 1)} V. Do not connect; have a qualified person check the supply and the cable.`,
							{ value: volts, limit: volts < t.supplyMinV ? t.supplyMinV : t.supplyMaxV }
						)
			);
		}
		if (polarity === undefined) out.push(finding('install.polarity', 'warn', 'Check the supply polarity with a meter and record it.'));
		else if (polarity === true) out.push(finding('install.polarity', 'pass', 'Polarity checked.'));
		else if (polarity === false) {
			out.push(
				finding('install.polarity', 'fail', 'Polarity wrong. Switch the supply off and correct the wiring before connecting the sensor.')
			);
		}
		out.push(...planFindings(o, isGood(mounting) ? mounting : undefined));
	}
	const findings = [...settingFindings, ...r.findings, ...out];
	return { findings, worst: worstSeverity(findings) };
}
