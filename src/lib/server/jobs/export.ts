// CSV and JSON exports of installation jobs and their points, for a spreadsheet or a
// maintenance-management system. One row per job, or one row per point; the JSON holds each job
// with its points, plan and as-installed record.
import Papa from 'papaparse';
import type { JobView } from './view';

/** A cell a spreadsheet would run as a formula gets a leading apostrophe (OWASP CSV injection). */
function guard(v: string | null | undefined): string {
	const s = v ?? '';
	return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}

const n = (v: number | null | undefined) => (v == null ? '' : String(v));
const yesNo = (v: boolean | null | undefined) => (v == null ? '' : v ? 'yes' : 'no');

export const JOB_CSV_COLUMNS = [
	'reference',
	'title',
	'status',
	'survey',
	'site',
	'revision',
	'assignee',
	'outage_start',
	'outage_end',
	'due_date',
	'lockout_required',
	'points',
	'points_recorded',
	'points_failing',
	'cable_margin',
	'closed_at',
	'close_note'
] as const;

export const POINT_CSV_COLUMNS = [
	'job',
	'number',
	'label',
	'machine',
	'component',
	'direction',
	'mounting',
	'material',
	'preparation',
	'torque_limit_nm',
	'cable_length_m',
	'conductor',
	'supply_point',
	'plan_worst',
	'mounting_used',
	'torque_nm',
	'supply_v',
	'polarity',
	'ready_at',
	'baseline_start_at',
	'deviation',
	'deviation_reason',
	'photo',
	'record_worst',
	'recorded_at',
	'recorded_by'
] as const;

function csv(fields: readonly string[], data: string[][]): string {
	return '\uFEFF' + Papa.unparse({ fields: [...fields], data }, { newline: '\r\n' });
}

export function jobsToCsv(views: JobView[]): string {
	return csv(
		JOB_CSV_COLUMNS,
		views.map((v) => [
			v.job.reference,
			guard(v.job.title),
			v.job.status,
			guard(v.job.survey),
			guard(v.job.site),
			String(v.job.revision),
			guard(v.job.assignee),
			v.job.outageStart ?? '',
			v.job.outageEnd ?? '',
			v.job.due ?? '',
			yesNo(v.job.lockoutRequired),
			String(v.points.length),
			String(v.points.filter((p) => p.record).length),
			String(v.points.filter((p) => p.record?.worst === 'fail').length),
			String(v.plan.cableMargin),
			v.job.closedAt ?? '',
			guard(v.job.closeNote)
		])
	);
}

export function pointsToCsv(views: JobView[]): string {
	return csv(
		POINT_CSV_COLUMNS,
		views.flatMap((v) =>
			v.points.map((p) => [
				v.job.reference,
				String(p.number),
				guard(p.label),
				guard(p.machine),
				guard(p.component),
				p.direction ?? '',
				p.mounting ?? '',
				p.material ?? '',
				guard(p.plan.summary),
				n(p.plan.torqueLimitNm),
				n(p.route?.lengthM),
				guard(p.plan.conductor),
				guard(p.route?.supply),
				p.planWorst,
				p.record?.mounting ?? '',
				n(p.record?.torqueNm),
				n(p.record?.supplyV),
				p.record ? (p.record.polarityOk == null ? '' : p.record.polarityOk ? 'ok' : 'reversed') : '',
				p.record?.readyAt ?? '',
				p.record?.baselineStartAt ?? '',
				guard(p.record?.deviation),
				guard(p.record?.deviationReason),
				p.record?.photoMediaId ?? '',
				p.record?.worst ?? '',
				p.record?.recordedAt ?? '',
				guard(p.record?.recordedBy)
			])
		)
	);
}

/** The JSON export: each job with its plan and points (no board image bytes). */
export function jobsToJson(views: JobView[]) {
	return {
		exportedAt: new Date().toISOString(),
		jobs: views.map((v) => ({
			...v.job,
			plan: v.plan,
			points: v.points.map((p) => ({
				id: p.id,
				number: p.number,
				label: p.label,
				machine: p.machine,
				component: p.component,
				direction: p.direction,
				surface: p.surface,
				mounting: p.mounting,
				material: p.material,
				notes: p.notes,
				preparation: p.plan.preparation,
				preparationSummary: p.plan.summary,
				torqueLimitNm: p.plan.torqueLimitNm,
				conductor: p.plan.conductor,
				cable: p.route ? { lengthM: p.route.lengthM, crossSectionMm2: p.route.crossSectionMm2, supplyPoint: p.route.supply } : null,
				planFindings: p.planFindings,
				planWorst: p.planWorst,
				checklist: p.plan.checklist,
				record: p.record
			}))
		}))
	};
}
