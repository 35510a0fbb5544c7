// Read-only views for the survey pages that the survey and board repositories do not give:
// which machines already have a board, each machine's photos and drawings, who is assigned.
import type { DB } from './index';

/** Per survey: how many of its machines have at least one board. */
export async function machinesWithBoards(db: DB, organisationId: string): Promise<Map<string, number>> {
	const rows = await db
		.selectFrom('board')
		.select(['board.survey_id'])
		.select((eb) => eb.fn.count<string>('board.machine_id').distinct().as('n'))
		.where('board.organisation_id', '=', organisationId)
		.groupBy('board.survey_id')
		.execute();
	return new Map(rows.map((r) => [r.survey_id, Number(r.n)]));
}

/** Surveys this person is assigned to. */
export async function assignedSurveyIds(db: DB, organisationId: string, userId: string): Promise<Set<string>> {
	const rows = await db
		.selectFrom('survey_assignee')
		.innerJoin('survey', 'survey.id', 'survey_assignee.survey_id')
		.select('survey_assignee.survey_id')
		.where('survey.organisation_id', '=', organisationId)
		.where('survey_assignee.user_id', '=', userId)
		.execute();
	return new Set(rows.map((r) => r.survey_id));
}

export interface MachineMedia {
	id: string;
	machineId: string;
	kind: 'photo' | 'drawing';
	caption: string;
	width: number;
	height: number;
	thumbUrl: string;
	createdAt: string;
}

/** Live photos and drawings of the given machines, newest first. */
export async function mediaForMachines(db: DB, organisationId: string, machineIds: string[]): Promise<MachineMedia[]> {
	if (machineIds.length === 0) return [];
	const rows = await db
		.selectFrom('media')
		.select(['id', 'machine_id', 'kind', 'caption', 'width', 'height', 'created_at'])
		.where('organisation_id', '=', organisationId)
		.where('machine_id', 'in', machineIds)
		.where('archived_at', 'is', null)
		// Photos of installed sensors belong to their job's record, not to the survey's boards.
		.where(({ not, exists, selectFrom }) =>
			not(exists(selectFrom('job_point').select('job_point.id').whereRef('job_point.photo_media_id', '=', 'media.id')))
		)
		.orderBy('created_at', 'desc')
		.execute();
	return rows.map((m) => ({
		id: m.id,
		machineId: m.machine_id,
		kind: m.kind,
		caption: m.caption,
		width: m.width,
		height: m.height,
		thumbUrl: `/api/v1/media/${m.id}/thumb`,
		createdAt: new Date(m.created_at).toISOString()
	}));
}

/** Live machines of the organisation's live sites, for picking what to walk. */
export function machinesBySite(db: DB, organisationId: string) {
	return db
		.selectFrom('machine')
		.leftJoin('area', 'area.id', 'machine.area_id')
		.select([
			'machine.id',
			'machine.site_id',
			'machine.name',
			'machine.tag',
			'machine.kind',
			'machine.hazardous_area',
			'area.name as area_name'
		])
		.where('machine.organisation_id', '=', organisationId)
		.where('machine.archived_at', 'is', null)
		.orderBy('area.name')
		.orderBy('machine.name')
		.execute();
}
