// Demo survey: a site walk under way at the invented water-treatment works, with one board
// already marked up on the sketch of raw water pump 1 so the live board has something to show
// (its content is in seed-board.ts).
// Idempotent: the survey is looked up by title.
import * as Y from 'yjs';
import type { DB } from './index';
import * as surveys from './surveys';
import * as boards from './boards';
import { DEMO_SITE } from './seed-register';
import { writeDemoBoard } from './seed-board';
import { transitionSurvey } from '../review/workflow';

export const DEMO_SURVEY = 'Site walk: raw water and aeration (demo)';

export async function seedSurvey(db: DB, organisationId: string) {
	const exists = await db
		.selectFrom('survey')
		.select('id')
		.where('organisation_id', '=', organisationId)
		.where('title', '=', DEMO_SURVEY)
		.executeTakeFirst();
	if (exists) return exists.id;
	const site = await db
		.selectFrom('site')
		.select('id')
		.where('organisation_id', '=', organisationId)
		.where('name', '=', DEMO_SITE)
		.executeTakeFirst();
	if (!site) return null;
	const machines = await db
		.selectFrom('machine')
		.select(['id', 'tag'])
		.where('organisation_id', '=', organisationId)
		.where('site_id', '=', site.id)
		.where('tag', 'in', ['RW-P01', 'RW-M01', 'AB-01'])
		.execute();
	const pump = machines.find((m) => m.tag === 'RW-P01');
	if (!pump) return null;
	const engineer = await db.selectFrom('app_user').select('id').where('email', '=', 'engineer@harrowgate.example').executeTakeFirst();
	const tech = await db.selectFrom('app_user').select('id').where('email', '=', 'tech@harrowgate.example').executeTakeFirst();
	const planned = new Date();
	planned.setDate(planned.getDate() + 7);
	const survey = await surveys.create(db, organisationId, engineer?.id ?? null, {
		siteId: site.id,
		title: DEMO_SURVEY,
		plannedDate: planned.toISOString().slice(0, 10),
		notes: 'Raw water pumps and the aeration blower first; the blower hall needs a permit for work at height.',
		machineIds: machines.map((m) => m.id),
		assignees: [
			...(engineer ? [{ userId: engineer.id, role: 'engineer' as const }] : []),
			...(tech ? [{ userId: tech.id, role: 'technician' as const }] : [])
		]
	});
	if (!survey) return null;
	if (engineer)
		await transitionSurvey(db, { organisationId, surveyId: survey.id, name: 'start', actor: { userId: engineer.id, role: 'engineer' } });
	else await db.updateTable('survey').set({ status: 'walking' }).where('id', '=', survey.id).execute();

	const photo = await db
		.selectFrom('media')
		.select('id')
		.where('organisation_id', '=', organisationId)
		.where('machine_id', '=', pump.id)
		.where('archived_at', 'is', null)
		.orderBy('created_at')
		.executeTakeFirst();
	const board = await boards.create(db, organisationId, {
		surveyId: survey.id,
		machineId: pump.id,
		mediaId: photo?.id ?? null,
		title: 'RW-P01 from the drive side'
	});
	if (!board) return survey.id;
	const supply = await db
		.selectFrom('supply_point')
		.innerJoin('area', 'area.id', 'supply_point.area_id')
		.select('supply_point.id')
		.where('supply_point.organisation_id', '=', organisationId)
		.where('area.site_id', '=', site.id)
		.orderBy('supply_point.name')
		.executeTakeFirst();

	const doc = new Y.Doc();
	writeDemoBoard(doc, { createdBy: tech?.id ?? '', supplyPointId: supply?.id ?? null });
	await db
		.updateTable('board')
		.set({ snapshot: Buffer.from(Y.encodeStateAsUpdate(doc)) })
		.where('id', '=', board.id)
		.execute();
	doc.destroy();
	return survey.id;
}
