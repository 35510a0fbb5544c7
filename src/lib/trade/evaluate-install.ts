import { worstSeverity, type Finding, type Severity } from './findings';
import { fmt, InputReader, isGood } from './inputs';
import { finding, MOUNTINGS, thresholdsForEvaluation, type Mounting } from './evaluate-point';
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
	}
	const findings = [...settingFindings, ...r.findings, ...out];
	return { findings, worst: worstSeverity(findings) };
}
