// Demo surveys past the site walk, one in each later state, made through the same services the
// pages use (review workflow, approval writing the revision, issuing, recording and closing
// jobs) so every row agrees with what the app would have written:
// - submitted, with one point flagged by the engineer (backwash pump);
// - jobs issued, one job for the technician due this week (aeration blower 1);
// - closed, its job recorded as installed and closed (raw water pump 2).
// Idempotent: each survey is looked up by title, and one found is left as it is.
import * as Y from 'yjs';
import sharp from 'sharp';
import type { DB } from './index';
import * as surveys from './surveys';
import * as boards from './boards';
import { DEMO_SITE } from './seed-register';
import { readDocument } from './board-document';
import { transitionSurvey } from '../review/workflow';
import { approvedPointsOfLatestRevision } from '../jobs/repository';
import { closeJob, issueJobs, recordPoint } from '../jobs/service';
import { storeUpload } from '../media/service';
import { DEFAULT_LIMITS } from '../media/process';
import type { Storage } from '../storage/index';
import { addPoint, addRoute, addZone, decidePoint, readBoard, setScale } from '../../board/model';
import type { NewPoint } from '../../board/model';
import type { ZoneKind } from '../../schemas/board';

export const DEMO_SURVEY_SUBMITTED = 'Site walk: backwash pump (demo)';
export const DEMO_SURVEY_ISSUED = 'Aeration blower 1 sensors (demo)';
export const DEMO_SURVEY_CLOSED = 'Raw water pump 2 sensors (demo)';

type Actor = { userId: string; role: 'engineer' | 'technician' };

interface DemoPoint extends Omit<NewPoint, 'createdBy'> {
	/** Cable run to the board's supply point, in metres (entered). */
	cableM: number;
	/** The route's bends between the point and the board edge. */
	via: Array<[number, number]>;
}

/** An ISO date `days` from today (UTC). */
function isoDay(days: number, from = new Date()): string {
	const d = new Date(Date.UTC(from.getUTCFullYear(), from.getUTCMonth(), from.getUTCDate() + days));
	return d.toISOString().slice(0, 10);
}

/** A due date inside the current week (Monday to Sunday): two days on, or Sunday if that is sooner. */
export function dueThisWeek(today = new Date()): string {
	const toSunday = (7 - today.getUTCDay()) % 7;
	return isoDay(Math.min(2, toSunday), today);
}

async function userId(db: DB, email: string) {
	return (await db.selectFrom('app_user').select('id').where('email', '=', email).executeTakeFirst())?.id ?? null;
}

async function machineByTag(db: DB, organisationId: string, tag: string) {
	return db
		.selectFrom('machine')
		.select(['id', 'tag', 'name', 'area_id'])
		.where('organisation_id', '=', organisationId)
		.where('tag', '=', tag)
		.executeTakeFirst();
}

async function firstPhoto(db: DB, organisationId: string, machineId: string) {
	return (
		(
			await db
				.selectFrom('media')
				.select('id')
				.where('organisation_id', '=', organisationId)
				.where('machine_id', '=', machineId)
				.where('archived_at', 'is', null)
				.orderBy('created_at')
				.executeTakeFirst()
		)?.id ?? null
	);
}

async function supplyOfArea(db: DB, organisationId: string, areaId: string | null) {
	if (!areaId) return null;
	return (
		(
			await db
				.selectFrom('supply_point')
				.select('id')
				.where('organisation_id', '=', organisationId)
				.where('area_id', '=', areaId)
				.orderBy('tag')
				.executeTakeFirst()
		)?.id ?? null
	);
}

/** Appends what `edit` changes on the stored board as one update by `by` (as the live board stores edits). */
async function editBoard(db: DB, boardId: string, by: string, edit: (doc: Y.Doc) => void) {
	const doc = new Y.Doc();
	const stored = await readDocument(db, boardId);
	if (stored) Y.applyUpdate(doc, stored);
	const before = Y.encodeStateVector(doc);
	edit(doc);
	await db
		.insertInto('board_update')
		.values({ board_id: boardId, update: Buffer.from(Y.encodeStateAsUpdate(doc, before)), user_id: by })
		.execute();
	doc.destroy();
}

interface StateSpec {
	title: string;
	notes: string;
	boardTag: string;
	otherTags: string[];
	boardTitle: string;
	plannedInDays: number;
	points: DemoPoint[];
	zone?: { label: string; kind: ZoneKind; polygon: Array<[number, number]> };
}

/** A survey with one marked-up board, walked and submitted by the technician. Returns ids, or null if it exists or cannot be made. */
async function walkedSurvey(db: DB, organisationId: string, spec: StateSpec, engineer: Actor, tech: Actor) {
	const exists = await db
		.selectFrom('survey')
		.select('id')
		.where('organisation_id', '=', organisationId)
		.where('title', '=', spec.title)
		.executeTakeFirst();
	if (exists) return null;
	const site = await db
		.selectFrom('site')
		.select('id')
		.where('organisation_id', '=', organisationId)
		.where('name', '=', DEMO_SITE)
		.executeTakeFirst();
	const machine = await machineByTag(db, organisationId, spec.boardTag);
	if (!site || !machine) return null;
	const others = (await Promise.all(spec.otherTags.map((t) => machineByTag(db, organisationId, t)))).filter((m) => !!m);
	const survey = await surveys.create(db, organisationId, engineer.userId, {
		siteId: site.id,
		title: spec.title,
		plannedDate: isoDay(spec.plannedInDays),
		notes: spec.notes,
		machineIds: [machine.id, ...others.map((m) => m!.id)],
		assignees: [
			{ userId: engineer.userId, role: 'engineer' },
			{ userId: tech.userId, role: 'technician' }
		]
	});
	if (!survey) return null;
	await transitionSurvey(db, { organisationId, surveyId: survey.id, name: 'start', actor: engineer });
	const board = await boards.create(db, organisationId, {
		surveyId: survey.id,
		machineId: machine.id,
		mediaId: await firstPhoto(db, organisationId, machine.id),
		title: spec.boardTitle
	});
	if (!board) return null;
	const supplyPointId = await supplyOfArea(db, organisationId, machine.area_id);
	await editBoard(db, board.id, tech.userId, (doc) => {
		setScale(doc, { a: [900, 800], b: [1420, 800], lengthMm: 800 }, 'seed');
		if (spec.zone) addZone(doc, spec.zone, 'seed');
		for (const p of spec.points) {
			const { cableM, via, ...fields } = p;
			const id = addPoint(doc, { ...fields, createdBy: tech.userId }, 'seed');
			addRoute(
				doc,
				{
					pointId: id,
					supplyPointId,
					exitLabel: supplyPointId ? '' : 'Junction box',
					vertices: [[p.x, p.y], ...via],
					lengthEnteredM: cableM,
					crossSectionMm2: 0.75,
					fixings: 'clips'
				},
				'seed'
			);
		}
	});
	await transitionSurvey(db, {
		organisationId,
		surveyId: survey.id,
		name: 'submit',
		actor: tech,
		note: 'Walked with the plant running; every point checked by hand for a flat seat.'
	});
	return { surveyId: survey.id, boardId: board.id, machineId: machine.id };
}

/** Approves every point (the engineer's decisions on the board), approves the survey and issues one job to the technician. */
async function approveAndIssue(
	db: DB,
	organisationId: string,
	surveyId: string,
	boardId: string,
	engineer: Actor,
	tech: Actor,
	due: string
) {
	await editBoard(db, boardId, engineer.userId, (doc) => {
		for (const p of readBoard(doc).points) decidePoint(doc, p.id, 'approved', { userId: engineer.userId, name: 'Idris Calloway' });
	});
	const approved = await transitionSurvey(db, {
		organisationId,
		surveyId,
		name: 'approve',
		actor: engineer,
		note: 'Layout approved as walked.'
	});
	const latest = (await approvedPointsOfLatestRevision(db, organisationId, surveyId))!;
	const [job] = await issueJobs(db, null, organisationId, surveyId, engineer, {
		revision: approved.revision!.number,
		note: '',
		jobs: [
			{
				title: null,
				assigneeUserId: tech.userId,
				outageStart: null,
				outageEnd: null,
				dueDate: due,
				lockoutRequested: false,
				notes: 'Permit to work from the shift supervisor before isolating.',
				points: latest.points.map((p) => ({ revisionBoardId: p.revision_board_id, pointId: p.point_id }))
			}
		]
	});
	return job!;
}

/** A drawn close-up of an installed sensor on its seat (demo picture, not a photo). */
async function installedSketch(label: string): Promise<Buffer> {
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="800" height="600" viewBox="0 0 800 600">
		<rect width="800" height="600" fill="#eef1f4"/>
		<rect x="120" y="360" width="560" height="160" rx="18" fill="#7d8f7a" stroke="#33475b" stroke-width="6"/>
		<rect x="330" y="330" width="140" height="30" fill="#a9b4bf" stroke="#33475b" stroke-width="4"/>
		<rect x="350" y="170" width="100" height="160" rx="12" fill="#6b7f93" stroke="#33475b" stroke-width="5"/>
		<path d="M 400 170 C 400 100 560 110 640 60" fill="none" stroke="#33475b" stroke-width="10"/>
		<text x="40" y="70" font-family="DejaVu Sans, sans-serif" font-size="40" font-weight="bold" fill="#33475b">${label}</text>
		<text x="40" y="115" font-family="DejaVu Sans, sans-serif" font-size="26" fill="#33475b">as installed (demo sketch)</text>
	</svg>`;
	return sharp(Buffer.from(svg)).png().toBuffer();
}

const PUMP_POINTS: DemoPoint[] = [
	{
		x: 610,
		y: 560,
		component: 'Pump drive-end bearing housing',
		direction: 'radial_h',
		surface: 'machined_housing',
		mounting: 'stud',
		material: 'cast_iron',
		flatDiameterMm: 40,
		wallThicknessMm: 22,
		distanceToBearingMm: 20,
		surfaceTempC: 40,
		cableM: 16,
		via: [
			[610, 400],
			[1500, 400],
			[1500, 850]
		]
	},
	{
		x: 1000,
		y: 520,
		component: 'Motor drive-end bearing housing',
		direction: 'radial_h',
		surface: 'cast_housing',
		mounting: 'bonded_pad',
		material: 'cast_iron',
		flatDiameterMm: 32,
		wallThicknessMm: 18,
		distanceToBearingMm: 25,
		surfaceTempC: 50,
		cableM: 14,
		via: [
			[1000, 420],
			[1500, 420],
			[1500, 850]
		]
	}
];

export async function seedStates(db: DB, organisationId: string, opts: { storage?: Storage } = {}) {
	const engineerId = await userId(db, 'engineer@harrowgate.example');
	const techId = await userId(db, 'tech@harrowgate.example');
	if (!engineerId || !techId) return;
	const engineer: Actor = { userId: engineerId, role: 'engineer' };
	const tech: Actor = { userId: techId, role: 'technician' };

	// Submitted: the engineer has approved the pump bearing point and flagged the motor point.
	const submitted = await walkedSurvey(
		db,
		organisationId,
		{
			title: DEMO_SURVEY_SUBMITTED,
			notes: 'Backwash pump on its variable-speed drive; the speed signal comes from the drive panel.',
			boardTag: 'BW-P01',
			otherTags: [],
			boardTitle: 'BW-P01 from the drive side',
			plannedInDays: -2,
			zone: {
				label: 'Coupling',
				kind: 'coupling',
				polygon: [
					[680, 535],
					[780, 535],
					[780, 685],
					[680, 685]
				]
			},
			points: [
				PUMP_POINTS[0]!,
				{
					...PUMP_POINTS[1]!,
					x: 1300,
					y: 520,
					component: 'Motor frame, mid-length',
					distanceToBearingMm: 180,
					notes: 'Easiest place to reach from the walkway.',
					via: [
						[1300, 420],
						[1500, 420],
						[1500, 850]
					]
				}
			]
		},
		engineer,
		tech
	);
	if (submitted) {
		await editBoard(db, submitted.boardId, engineer.userId, (doc) => {
			const [p1, p2] = readBoard(doc).points.sort((a, b) => a.label.localeCompare(b.label));
			if (p1) decidePoint(doc, p1.id, 'approved', { userId: engineer.userId, name: 'Idris Calloway' });
			if (p2)
				decidePoint(doc, p2.id, 'flagged', {
					userId: engineer.userId,
					name: 'Idris Calloway',
					reason: 'too_far',
					note: 'Move it onto the drive-end bearing housing, within 50 mm of the bearing.'
				});
		});
	}

	// Jobs issued: one job for the technician, due this week.
	const issued = await walkedSurvey(
		db,
		organisationId,
		{
			title: DEMO_SURVEY_ISSUED,
			notes: 'Blower hall: permit for work at height; the side panels of the acoustic enclosure come off.',
			boardTag: 'AB-01',
			otherTags: ['AB-M01'],
			boardTitle: 'AB-01 and its motor',
			plannedInDays: -9,
			points: [
				{
					x: 790,
					y: 590,
					component: 'Blower drive-end bearing housing',
					direction: 'radial_h',
					surface: 'machined_housing',
					mounting: 'stud',
					material: 'cast_iron',
					flatDiameterMm: 38,
					wallThicknessMm: 20,
					distanceToBearingMm: 15,
					surfaceTempC: 60,
					cableM: 12,
					via: [
						[790, 420],
						[1500, 420],
						[1500, 850]
					]
				},
				{
					x: 1100,
					y: 560,
					component: 'Motor drive-end bearing housing',
					direction: 'radial_v',
					surface: 'machined_housing',
					mounting: 'stud',
					material: 'cast_iron',
					flatDiameterMm: 36,
					wallThicknessMm: 18,
					distanceToBearingMm: 20,
					surfaceTempC: 55,
					cableM: 9,
					via: [
						[1100, 450],
						[1500, 450],
						[1500, 850]
					]
				}
			]
		},
		engineer,
		tech
	);
	if (issued) await approveAndIssue(db, organisationId, issued.surveyId, issued.boardId, engineer, tech, dueThisWeek());

	// Closed: the job recorded point by point and closed, which closes the survey.
	const closed = await walkedSurvey(
		db,
		organisationId,
		{
			title: DEMO_SURVEY_CLOSED,
			notes: 'Standby pump: isolated for the install while RW-P01 runs.',
			boardTag: 'RW-P02',
			otherTags: [],
			boardTitle: 'RW-P02 from the drive side',
			plannedInDays: -30,
			points: PUMP_POINTS
		},
		engineer,
		tech
	);
	if (closed) {
		const job = await approveAndIssue(db, organisationId, closed.surveyId, closed.boardId, engineer, tech, isoDay(-20));
		const points = await db
			.selectFrom('job_point as jp')
			.innerJoin('revision_point as rp', (j) =>
				j.onRef('rp.revision_board_id', '=', 'jp.revision_board_id').onRef('rp.point_id', '=', 'jp.point_id')
			)
			.select(['jp.id', 'rp.label', 'rp.mounting'])
			.where('jp.job_id', '=', job.id)
			.orderBy('jp.number')
			.execute();
		const day = isoDay(-21);
		for (const [i, p] of points.entries()) {
			let photo: string | null = null;
			if (opts.storage) {
				photo = (
					await storeUpload(db, opts.storage, DEFAULT_LIMITS, {
						organisationId,
						machineId: closed.machineId,
						userId: tech.userId,
						kind: 'photo',
						caption: `${p.label} as installed (demo sketch)`,
						filename: `rw-p02-${p.label.toLowerCase()}-installed.png`,
						bytes: await installedSketch(`RW-P02 ${p.label}`)
					})
				).id;
			}
			const mounting = p.mounting === 'bonded_pad' || p.mounting === 'magnet' ? p.mounting : 'stud';
			await recordPoint(db, organisationId, job.id, p.id, tech, {
				mounting,
				torqueNm: mounting === 'magnet' ? null : 8,
				supplyV: 23.6 - i * 0.3,
				polarity: 'ok',
				readyAt: `${day}T10:${10 + i * 20}:00Z`,
				baselineStartAt: `${day}T11:${10 + i * 20}:00Z`,
				deviation: '',
				deviationReason: '',
				recordKey: `demo-${p.id}`,
				photoMediaId: null,
				uploadedPhotoId: photo
			});
		}
		await closeJob(db, organisationId, job.id, engineer, opts.storage ? '' : 'Demo seeded without picture storage: no installed photos.');
	}
}
