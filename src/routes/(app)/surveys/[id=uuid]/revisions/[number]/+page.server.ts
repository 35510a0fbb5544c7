import { error } from '@sveltejs/kit';
import { revisionNumberSchema } from '$lib/schemas/review';
import { requirePage } from '$lib/server/auth/require';
import { context } from '$lib/server/context';
import * as surveys from '$lib/server/db/surveys';
import { getRevision, listRevisions } from '$lib/server/review/revisions';
import { compareLabels } from '$lib/trade';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async ({ locals, params, url }) => {
	const viewer = requirePage(locals, 'survey.read', url);
	const n = revisionNumberSchema.safeParse(params.number);
	if (!n.success) error(404, 'No such revision of this survey.');
	const db = context().handle.db;
	const survey = await surveys.get(db, viewer.organisationId, params.id);
	if (!survey) error(404, 'No such survey in your organisation.');
	const [data, all] = await Promise.all([
		getRevision(db, viewer.organisationId, survey.id, n.data),
		listRevisions(db, viewer.organisationId, survey.id)
	]);
	if (!data) error(404, 'No such revision of this survey.');
	const r = data.revision;
	return {
		survey: { id: survey.id, title: survey.title },
		numbers: all.map((x) => x.number),
		revision: {
			number: r.number,
			approvedAt: new Date(r.approved_at).toISOString(),
			approver: r.approver_name ?? 'A former member',
			note: r.note,
			exceptions: r.confirmed_exceptions ?? []
		},
		boards: data.boards.map((b) => ({
			id: b.board_id,
			title: b.title,
			hash: b.state_vector_sha256,
			scale: b.scale_length_mm !== null ? `${b.scale_length_mm} mm reference line` : null,
			points: data.points
				.filter((p) => p.revision_board_id === b.id)
				.sort((x, y) => compareLabels(x.label, y.label))
				.map((p) => ({
					id: p.point_id,
					label: p.label,
					component: p.component,
					x: p.x,
					y: p.y,
					status: p.status,
					reason: p.decision_reason,
					surface: p.surface,
					mounting: p.mounting,
					flat: p.flat_diameter_mm,
					wall: p.wall_thickness_mm,
					distance: p.distance_used_mm,
					distanceSource: p.distance_source,
					worst: p.worst,
					findings: (p.findings as Array<{ severity: string; message: string }>)
						.filter((f) => f.severity !== 'pass')
						.map((f) => ({ severity: f.severity, message: f.message }))
				})),
			routes: data.routes
				.filter((x) => x.revision_board_id === b.id)
				.map((x) => ({
					id: x.route_id,
					point: data.points.find((p) => p.revision_board_id === b.id && p.point_id === x.point_id)?.label ?? '?',
					lengthM: x.length_m,
					lengthSource: x.length_source,
					conductor: x.cross_section_mm2,
					supply: x.supply_point_id ? 'supply point' : x.exit_label || 'none',
					worst: x.worst
				})),
			zones: data.zones.filter((z) => z.revision_board_id === b.id).map((z) => ({ id: z.zone_id, label: z.label, kind: z.kind }))
		}))
	};
};
