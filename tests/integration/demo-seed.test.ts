// The demo in every state: one survey walking, one submitted with a flagged point, one with its
// job issued to the technician and due this week, one closed with its job recorded as installed;
// members for every role; and a reset that drops only the demo organisation and gives the same
// demo again, however often it runs.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as Y from 'yjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { resetDemo, seedDemo, DEMO_ORG } from '../../src/lib/server/db/seed';
import { DEMO_SURVEY } from '../../src/lib/server/db/seed-survey';
import { DEMO_SURVEY_CLOSED, DEMO_SURVEY_ISSUED, DEMO_SURVEY_SUBMITTED, dueThisWeek } from '../../src/lib/server/db/seed-states';
import { diskStorage } from '../../src/lib/server/storage/index';
import { readDocument } from '../../src/lib/server/collab/persistence';
import { readBoard } from '../../src/lib/board/model';
import { dateText } from '../../src/lib/server/jobs/repository';

let t: TestDatabase;
let dir: string;
const storage = () => diskStorage(dir);

beforeAll(async () => {
	t = await createTestDatabase();
	dir = mkdtempSync(join(tmpdir(), 'spotface-demo-'));
});
afterAll(async () => t?.drop());

const orgId = async () => (await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirstOrThrow()).id;

async function surveyOf(org: string, title: string) {
	return t.db
		.selectFrom('survey')
		.select(['id', 'status'])
		.where('organisation_id', '=', org)
		.where('title', '=', title)
		.executeTakeFirstOrThrow();
}

const TABLES = [
	'member',
	'site',
	'area',
	'supply_point',
	'machine',
	'bearing',
	'media',
	'survey',
	'board',
	'survey_transition',
	'survey_revision',
	'installation_job',
	'job_point'
] as const;

async function counts(org: string) {
	const out: Record<string, number> = {};
	for (const table of TABLES) {
		out[table] = Number(
			(
				await t.db
					.selectFrom(table)
					.select((eb) => eb.fn.countAll<string>().as('n'))
					.where('organisation_id', '=', org)
					.executeTakeFirstOrThrow()
			).n
		);
	}
	return out;
}

function filesUnder(d: string): number {
	return readdirSync(d, { recursive: true, withFileTypes: true }).filter((e) => e.isFile()).length;
}

describe('demo in every state', () => {
	it('seeds one survey in each state through the real workflow', async () => {
		await seedDemo(t.db, [], { storage: storage() });
		const org = await orgId();

		const roles = await t.db.selectFrom('member').select('role').where('organisation_id', '=', org).execute();
		expect(roles.map((r) => r.role).sort()).toEqual(['admin', 'engineer', 'technician', 'viewer']);

		const statuses = (await t.db.selectFrom('survey').select('status').where('organisation_id', '=', org).execute()).map((s) => s.status);
		expect(statuses.sort()).toEqual(['closed', 'jobs_issued', 'submitted', 'walking']);
		expect((await surveyOf(org, DEMO_SURVEY)).status).toBe('walking');

		// Submitted: the engineer's decisions are on the board, one point flagged with a reason.
		const submitted = await surveyOf(org, DEMO_SURVEY_SUBMITTED);
		expect(submitted.status).toBe('submitted');
		const board = await t.db.selectFrom('board').select(['id', 'media_id']).where('survey_id', '=', submitted.id).executeTakeFirstOrThrow();
		expect(board.media_id).not.toBeNull();
		const doc = new Y.Doc();
		Y.applyUpdate(doc, (await readDocument(t.db, board.id))!);
		const points = readBoard(doc).points;
		expect(points.map((p) => p.status).sort()).toEqual(['approved', 'flagged']);
		expect(points.find((p) => p.status === 'flagged')!.decisionReason).toBe('too_far');
		const moves = await t.db
			.selectFrom('survey_transition')
			.select('transition')
			.where('survey_id', '=', submitted.id)
			.orderBy('created_at')
			.execute();
		expect(moves.map((m) => m.transition)).toEqual(['start', 'submit']);

		const tech = (await t.db.selectFrom('app_user').select('id').where('email', '=', 'tech@harrowgate.example').executeTakeFirstOrThrow())
			.id;

		// Jobs issued: approved as revision 1, one open job for the technician due this week.
		const issued = await surveyOf(org, DEMO_SURVEY_ISSUED);
		expect(issued.status).toBe('jobs_issued');
		expect(await t.db.selectFrom('survey_revision').select('number').where('survey_id', '=', issued.id).execute()).toEqual([{ number: 1 }]);
		const openJobs = await t.db.selectFrom('installation_job').selectAll().where('survey_id', '=', issued.id).execute();
		expect(openJobs).toHaveLength(1);
		expect(openJobs[0].status).toBe('issued');
		expect(openJobs[0].assignee_user_id).toBe(tech);
		const due = dateText(openJobs[0].due_date)!;
		const today = new Date().toISOString().slice(0, 10);
		const sunday = new Date();
		sunday.setUTCDate(sunday.getUTCDate() + ((7 - sunday.getUTCDay()) % 7));
		expect(due >= today && due <= sunday.toISOString().slice(0, 10), due).toBe(true);
		expect(due).toBe(dueThisWeek());
		expect(await t.db.selectFrom('job_point').select('id').where('job_id', '=', openJobs[0].id).execute()).toHaveLength(2);

		// Closed: its one job closed, every point recorded as installed with a photo and no failing finding.
		const closed = await surveyOf(org, DEMO_SURVEY_CLOSED);
		expect(closed.status).toBe('closed');
		const jobs = await t.db.selectFrom('installation_job').selectAll().where('survey_id', '=', closed.id).execute();
		expect(jobs).toHaveLength(1);
		expect(jobs[0].status).toBe('closed');
		expect(jobs[0].closed_at).not.toBeNull();
		const recorded = await t.db.selectFrom('job_point').selectAll().where('job_id', '=', jobs[0].id).orderBy('number').execute();
		expect(recorded).toHaveLength(2);
		for (const p of recorded) {
			expect(p.recorded_at).not.toBeNull();
			expect(p.recorded_by).toBe(tech);
			expect(['stud', 'bonded_pad']).toContain(p.mounting_used);
			expect(p.polarity_ok).toBe(true);
			expect(p.supply_v).toBeGreaterThan(20);
			expect(p.photo_media_id).not.toBeNull();
			expect(p.worst).not.toBe('fail');
		}
		const closedMoves = await t.db
			.selectFrom('survey_transition')
			.select('transition')
			.where('survey_id', '=', closed.id)
			.orderBy('created_at')
			.execute();
		expect(closedMoves.map((m) => m.transition)).toEqual(['start', 'submit', 'approve', 'issue_jobs', 'close']);
	});

	it('demo:reset drops only the demo organisation and gives the same demo again, each time', async () => {
		const other = await t.db.insertInto('organisation').values({ name: 'Another works' }).returning('id').executeTakeFirstOrThrow();
		await t.db.insertInto('site').values({ organisation_id: other.id, name: 'Their site', code: 'TS' }).execute();
		const before = await counts(await orgId());
		const files = filesUnder(dir);
		const oldOrg = await orgId();

		await resetDemo(t.db, [], { storage: storage() });
		const first = await counts(await orgId());
		expect(await orgId()).not.toBe(oldOrg);
		await resetDemo(t.db, [], { storage: storage() });
		const second = await counts(await orgId());

		expect(first).toEqual(before);
		expect(second).toEqual(before);
		expect(before.installation_job).toBe(2);
		// The old pictures are removed with their rows: as many files as after the first seed.
		expect(filesUnder(dir)).toBe(files);
		expect(await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).execute()).toHaveLength(1);
		expect(await t.db.selectFrom('site').select('name').where('organisation_id', '=', other.id).execute()).toEqual([
			{ name: 'Their site' }
		]);
		// The demo accounts are kept and sign in to the new organisation.
		expect(await t.db.selectFrom('app_user').select('id').where('email', 'like', '%@harrowgate.example').execute()).toHaveLength(4);
	});
});
