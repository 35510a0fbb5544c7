// From a job's rows (JobView) to what the job pack is drawn from. The board image is the board
// photo's display image from media storage, with the approved revision's points, routes and
// zones drawn on it by the renderer: never a screenshot of someone's browser.
import type { DB } from '../db/index';
import type { Storage } from '../storage/index';
import { SAFETY_CAUTIONS } from '../../trade/checklist';
import type { JobPackBoardImage, JobPackInput, PaperSize } from './pack/types';
import type { JobView } from './view';

export type BoardPhoto = JobPackBoardImage['image'];

const DIRECTION: Record<string, string> = { radial_h: 'radial H', radial_v: 'radial V', axial: 'axial' };
const JOB_STATUS: Record<string, string> = { issued: 'Issued', closed: 'Closed' };

/** The display images of the job's board photos, by revision board id (null when none or unreadable). */
export async function boardPhotos(db: DB, storage: Storage, organisationId: string, view: JobView): Promise<Map<string, BoardPhoto>> {
	const out = new Map<string, BoardPhoto>();
	for (const b of view.boards) {
		out.set(b.revisionBoardId, null);
		if (!b.mediaId) continue;
		const m = await db
			.selectFrom('media')
			.select(['display_key', 'display_mime_type', 'width', 'height'])
			.where('organisation_id', '=', organisationId)
			.where('id', '=', b.mediaId)
			.executeTakeFirst();
		if (!m || (m.display_mime_type !== 'image/jpeg' && m.display_mime_type !== 'image/png')) continue;
		const bytes = await storage.get(m.display_key).catch(() => null);
		if (!bytes) continue;
		out.set(b.revisionBoardId, { bytes: new Uint8Array(bytes), mime: m.display_mime_type, width: m.width, height: m.height });
	}
	return out;
}

/** Fills the job pack input from a job's view and its board photos. */
export function jobPackInputOf(
	view: JobView,
	photos: Map<string, BoardPhoto>,
	opts: { paper: PaperSize; generatedAt?: Date }
): JobPackInput {
	const boards: JobPackBoardImage[] = view.boards.map((b) => {
		const image = photos.get(b.revisionBoardId) ?? null;
		const pts = view.points.filter((p) => p.revisionBoardId === b.revisionBoardId);
		// Without a photo the drawing still needs a frame: the extent of what is drawn, with a margin.
		const xs = [
			...pts.flatMap((p) => [p.x, ...(p.route?.vertices ?? []).map((v) => v[0])]),
			...view.zones.filter((z) => z.revisionBoardId === b.revisionBoardId).flatMap((z) => z.polygon.map((v) => v[0]))
		];
		const ys = [
			...pts.flatMap((p) => [p.y, ...(p.route?.vertices ?? []).map((v) => v[1])]),
			...view.zones.filter((z) => z.revisionBoardId === b.revisionBoardId).flatMap((z) => z.polygon.map((v) => v[1]))
		];
		return {
			title: b.title,
			image,
			width: image?.width ?? Math.max(100, Math.ceil(Math.max(0, ...xs) * 1.1)),
			height: image?.height ?? Math.max(100, Math.ceil(Math.max(0, ...ys) * 1.1)),
			points: pts.map((p) => ({ number: p.number, x: p.x, y: p.y, worst: p.planWorst })),
			routes: pts
				.filter((p) => p.route && p.route.vertices.length >= 2)
				.map((p) => ({ pointNumber: p.number, vertices: p.route!.vertices })),
			zones: view.zones
				.filter((z) => z.revisionBoardId === b.revisionBoardId)
				.map((z) => ({ label: z.label, kind: z.kind, polygon: z.polygon }))
		};
	});
	return {
		paper: opts.paper,
		organisation: view.job.organisation,
		job: {
			reference: view.job.reference,
			title: view.job.title,
			survey: view.job.survey,
			site: view.job.site,
			revision: view.job.revision,
			status: JOB_STATUS[view.job.status] ?? view.job.status,
			assignee: view.job.assignee,
			outageStart: view.job.outageStart,
			outageEnd: view.job.outageEnd,
			due: view.job.due,
			lockoutRequired: view.plan.lockout.required,
			generatedAt: (opts.generatedAt ?? new Date()).toISOString()
		},
		boards,
		points: view.points.map((p) => ({
			number: p.number,
			label: p.label,
			machine: p.machine,
			component: p.component,
			direction: p.direction ? (DIRECTION[p.direction] ?? p.direction) : null,
			material: p.material,
			preparation: p.plan.preparation,
			torqueLimitNm: p.plan.torqueLimitNm,
			cableLengthM: p.route?.lengthM ?? null,
			conductor: p.plan.conductor,
			supplyPoint: p.route?.supply ?? null,
			notes: p.notes,
			findings: p.planFindings.map((f) => ({ severity: f.severity, rule: f.rule, message: f.message })),
			checklist: p.plan.checklist
		})),
		tools: view.plan.tools,
		materials: view.plan.materials,
		cableMargin: view.plan.cableMargin,
		cautions: SAFETY_CAUTIONS
	};
}
