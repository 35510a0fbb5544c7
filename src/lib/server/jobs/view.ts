// One job as the pages, the exports and the job pack see it: the job row, its points with the
// approved revision's data, the per-point plan (seat preparation, torque limit, checklist) and
// the job's lockout decision, tools and bill of materials, all from the trade's job planner.
import type { DB } from '../db/index';
import { getThresholds } from '../db/thresholds';
import { lockoutRequired, planJob, type JobPlan, type JobPlanPointResult } from '../../trade/job-plan';
import { MATERIALS, MOUNTINGS, type Material, type Mounting } from '../../trade/evaluate-point';
import type { Finding, Severity } from '../../trade/findings';
import type { Thresholds } from '../../trade/thresholds';
import { dateText, getJobRow, jobReference, listJobPoints, listRoutesOfBoards, listZonesOfBoards } from './repository';

const asMounting = (v: string | null): Mounting | null => ((MOUNTINGS as readonly string[]).includes(v ?? '') ? (v as Mounting) : null);
const asMaterial = (v: string | null): Material | null => ((MATERIALS as readonly string[]).includes(v ?? '') ? (v as Material) : null);

export interface JobRecordView {
	mounting: Mounting | null;
	torqueNm: number | null;
	supplyV: number | null;
	polarityOk: boolean | null;
	photoMediaId: string | null;
	readyAt: string | null;
	baselineStartAt: string | null;
	deviation: string;
	deviationReason: string;
	findings: Finding[];
	worst: Severity | null;
	recordedAt: string | null;
	recordedBy: string | null;
}

export interface JobPointView {
	id: string;
	number: number;
	label: string;
	component: string;
	machineId: string;
	machine: string;
	hazardousArea: boolean;
	boardId: string;
	revisionBoardId: string;
	boardTitle: string;
	boardMediaId: string | null;
	x: number;
	y: number;
	direction: string | null;
	surface: string | null;
	mounting: Mounting | null;
	material: Material | null;
	notes: string;
	planFindings: Finding[];
	planWorst: Severity;
	route: {
		vertices: Array<[number, number]>;
		lengthM: number | null;
		crossSectionMm2: number | null;
		supply: string | null;
		supplyV: number | null;
	} | null;
	plan: JobPlanPointResult;
	record: JobRecordView | null;
}

export interface JobView {
	job: {
		id: string;
		reference: string;
		number: number;
		title: string;
		status: 'issued' | 'closed';
		organisation: string;
		surveyId: string;
		survey: string;
		surveyStatus: string;
		site: string;
		revision: number;
		assigneeUserId: string | null;
		assignee: string | null;
		assigneeEmail: string | null;
		outageStart: string | null;
		outageEnd: string | null;
		due: string | null;
		lockoutRequired: boolean;
		notes: string;
		issuedAt: string;
		closedAt: string | null;
		closedBy: string | null;
		closeNote: string;
	};
	points: JobPointView[];
	boards: Array<{ revisionBoardId: string; boardId: string; title: string; mediaId: string | null }>;
	zones: Array<{ revisionBoardId: string; label: string; kind: string; polygon: Array<[number, number]> }>;
	plan: Omit<JobPlan, 'points'>;
	thresholds: Thresholds;
}

const iso = (d: Date | string | null) => (d == null ? null : new Date(d).toISOString());
const num = (v: number | string | null) => (v == null ? null : Number(v));

/** The job with everything it says, or null when it is not the organisation's. */
export async function loadJob(db: DB, organisationId: string, jobId: string): Promise<JobView | null> {
	const job = await getJobRow(db, organisationId, jobId);
	if (!job) return null;
	const [rows, thresholds] = await Promise.all([listJobPoints(db, organisationId, jobId), getThresholds(db, organisationId)]);
	const boardIds = [...new Set(rows.map((r) => r.revision_board_id))];
	const [routes, zones] = await Promise.all([listRoutesOfBoards(db, organisationId, boardIds), listZonesOfBoards(db, boardIds)]);
	const routeOf = new Map<string, (typeof routes)[number]>();
	for (const r of routes) {
		const key = `${r.revision_board_id}/${r.point_id}`;
		if (!routeOf.has(key)) routeOf.set(key, r);
	}
	const t = thresholds.effective;
	const planned = rows.map((r) => {
		const route = routeOf.get(`${r.revision_board_id}/${r.point_id}`) ?? null;
		return { r, route };
	});
	const planPoints = planned.map(({ r, route }) => ({
		label: r.label,
		mounting: asMounting(r.mounting),
		material: asMaterial(r.material),
		cableLengthM: num(route?.length_m ?? null),
		crossSectionMm2: num(route?.cross_section_mm2 ?? null),
		hazardousArea: r.hazardous_area
	}));
	// The stored flag is the decision at issue; the engineer asked for it only when the points
	// alone would not have required it.
	const askedFor = job.lockout_required && !lockoutRequired(planPoints).required;
	const plan = planJob(planPoints, { thresholds: t, lockoutRequested: askedFor });
	const points: JobPointView[] = planned.map(({ r, route }, i) => ({
		id: r.id,
		number: r.number,
		label: r.label,
		component: r.component,
		machineId: r.machine_id,
		machine: r.machine_tag ? `${r.machine_name} (${r.machine_tag})` : r.machine_name,
		hazardousArea: r.hazardous_area,
		boardId: r.board_id,
		revisionBoardId: r.revision_board_id,
		boardTitle: r.board_title,
		boardMediaId: r.board_media_id,
		x: Number(r.x),
		y: Number(r.y),
		direction: r.direction,
		surface: r.surface,
		mounting: asMounting(r.mounting),
		material: asMaterial(r.material),
		notes: r.notes,
		planFindings: (r.plan_findings ?? []) as Finding[],
		planWorst: (r.plan_worst ?? 'pass') as Severity,
		route: route
			? {
					vertices: route.vertices,
					lengthM: num(route.length_m),
					crossSectionMm2: num(route.cross_section_mm2),
					supply: route.supply_name ? `${route.supply_name}${route.supply_tag ? ` (${route.supply_tag})` : ''}` : route.exit_label || null,
					supplyV: num(route.supply_v)
				}
			: null,
		plan: plan.points[i],
		record: r.recorded_at
			? {
					mounting: r.mounting_used,
					torqueNm: num(r.torque_nm),
					supplyV: num(r.supply_v),
					polarityOk: r.polarity_ok,
					photoMediaId: r.photo_media_id,
					readyAt: iso(r.ready_at),
					baselineStartAt: iso(r.baseline_start_at),
					deviation: r.deviation,
					deviationReason: r.deviation_reason,
					findings: (r.record_findings ?? []) as Finding[],
					worst: r.record_worst,
					recordedAt: iso(r.recorded_at),
					recordedBy: r.recorded_by_name
				}
			: null
	}));
	const boards = new Map<string, JobView['boards'][number]>();
	for (const p of points) {
		if (!boards.has(p.revisionBoardId)) {
			boards.set(p.revisionBoardId, {
				revisionBoardId: p.revisionBoardId,
				boardId: p.boardId,
				title: p.boardTitle,
				mediaId: p.boardMediaId
			});
		}
	}
	const { points: _points, ...jobPlan } = plan;
	void _points;
	return {
		job: {
			id: job.id,
			reference: jobReference(job.number),
			number: job.number,
			title: job.title,
			status: job.status,
			organisation: job.organisation_name,
			surveyId: job.survey_id,
			survey: job.survey_title,
			surveyStatus: job.survey_status,
			site: job.site_name,
			revision: Number(job.revision_number),
			assigneeUserId: job.assignee_user_id,
			assignee: job.assignee_name,
			assigneeEmail: job.assignee_email,
			outageStart: iso(job.outage_start),
			outageEnd: iso(job.outage_end),
			due: dateText(job.due_date),
			lockoutRequired: plan.lockout.required,
			notes: job.notes,
			issuedAt: iso(job.issued_at)!,
			closedAt: iso(job.closed_at),
			closedBy: job.closed_by_name,
			closeNote: job.close_note
		},
		points,
		boards: [...boards.values()],
		zones: zones.map((z) => ({ revisionBoardId: z.revision_board_id, label: z.label, kind: z.kind, polygon: z.polygon })),
		plan: jobPlan,
		thresholds: t
	};
}
