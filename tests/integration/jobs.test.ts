// Installation jobs from the demo revision: grouping by machine, the plan each job carries
// (lockout for a stud, checklist per mounting method, thread engagement in an aluminium housing,
// bill of materials sums), the assignee's e-mail and the survey's move, the as-installed findings
// (over-torque, 19.8 V, reversed polarity), the closing rules, tenancy, and the CSV and JSON
// exports read back.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as Y from 'yjs';
import Papa from 'papaparse';
import { getDocument, OPS } from 'pdfjs-dist/legacy/build/pdf.mjs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { seedDemo, DEMO_ORG } from '../../src/lib/server/db/seed';
import { DEMO_SURVEY } from '../../src/lib/server/db/seed-survey';
import { diskStorage } from '../../src/lib/server/storage/index';
import { readDocument } from '../../src/lib/server/collab/persistence';
import { transitionSurvey, WorkflowError } from '../../src/lib/server/review/workflow';
import { addPoint, addRoute, decidePoint, readBoard } from '../../src/lib/board/model';
import * as boards from '../../src/lib/server/db/boards';
import { approvedPointsOfLatestRevision } from '../../src/lib/server/jobs/repository';
import { dashboardOf } from '../../src/lib/server/jobs/dashboard';
import { closeJob, issueJobs, JobError, recordPoint } from '../../src/lib/server/jobs/service';
import { loadJob } from '../../src/lib/server/jobs/view';
import { jobsToCsv, jobsToJson, pointsToCsv, POINT_CSV_COLUMNS } from '../../src/lib/server/jobs/export';
import { createMailer } from '../../src/lib/server/mail/mailer';
import { recordPointSchema, type IssueJobsInput } from '../../src/lib/schemas/job';
import { boardPhotos, jobPackInputOf } from '../../src/lib/server/jobs/pack-input';
import { renderJobPack } from '../../src/lib/server/jobs/pack/render';
import { SAFETY_CAUTIONS } from '../../src/lib/trade';
import type { Storage } from '../../src/lib/server/storage/index';

let t: TestDatabase;
let org: string;
let surveyId: string;
let engineer: { userId: string; role: 'engineer' };
let tech: { userId: string; role: 'technician' };
let viewer: { userId: string; role: 'viewer' };
let jobIds: string[] = [];
let storage: Storage;

const mail = () => ({ mailer: createMailer({ db: t.db, from: 'spotface@test.example' }), origin: 'http://spotface.test' });

async function storedDoc(boardId: string) {
	const doc = new Y.Doc();
	const bytes = await readDocument(t.db, boardId);
	if (bytes) Y.applyUpdate(doc, bytes);
	return doc;
}
async function write(boardId: string, edit: (doc: Y.Doc) => void) {
	const doc = await storedDoc(boardId);
	const sv = Y.encodeStateVector(doc);
	edit(doc);
	await t.db
		.insertInto('board_update')
		.values({ board_id: boardId, update: Buffer.from(Y.encodeStateAsUpdate(doc, sv)), user_id: engineer.userId })
		.execute();
}

beforeAll(async () => {
	t = await createTestDatabase();
	storage = diskStorage(mkdtempSync(join(tmpdir(), 'spotface-jobs-')));
	await seedDemo(t.db, [], { storage, states: false });
	org = (await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirstOrThrow()).id;
	surveyId = (
		await t.db
			.selectFrom('survey')
			.select('id')
			.where('organisation_id', '=', org)
			.where('title', '=', DEMO_SURVEY)
			.executeTakeFirstOrThrow()
	).id;
	const user = async (email: string) =>
		(await t.db.selectFrom('app_user').select('id').where('email', '=', email).executeTakeFirstOrThrow()).id;
	engineer = { userId: await user('engineer@harrowgate.example'), role: 'engineer' };
	tech = { userId: await user('tech@harrowgate.example'), role: 'technician' };
	viewer = { userId: await user('viewer@harrowgate.example'), role: 'viewer' };

	// The demo pump board: P1 (stud, cast iron) and P3 (bonded pad) approved, P2 (fan cowl) rejected.
	const pumpBoard = (await t.db.selectFrom('board').select('id').where('survey_id', '=', surveyId).executeTakeFirstOrThrow()).id;
	const decider = { userId: engineer.userId, name: 'Engineer' };
	await write(pumpBoard, (doc) => {
		for (const p of readBoard(doc).points) {
			decidePoint(
				doc,
				p.id,
				p.label === 'P2' ? 'rejected' : 'approved',
				p.label === 'P2' ? { ...decider, reason: 'sheet_cover' } : decider
			);
		}
	});
	// A second machine, the motor, with one stud point in an aluminium end shield (30 m of cable).
	const motor = await t.db
		.selectFrom('machine')
		.select('id')
		.where('organisation_id', '=', org)
		.where('tag', '=', 'RW-M01')
		.executeTakeFirstOrThrow();
	const motorBoard = await boards.create(t.db, org, { surveyId, machineId: motor.id, mediaId: null, title: 'RW-M01 drive end' });
	await write(motorBoard!.id, (doc) => {
		const id = addPoint(doc, {
			x: 100,
			y: 100,
			createdBy: tech.userId,
			component: 'Motor drive-end shield',
			direction: 'radial_h',
			surface: 'machined_housing',
			mounting: 'stud',
			material: 'aluminium',
			flatDiameterMm: 40,
			wallThicknessMm: 25,
			distanceToBearingMm: 20
		});
		addRoute(doc, {
			pointId: id,
			supplyPointId: null,
			exitLabel: 'Junction box JB-1',
			vertices: [
				[100, 100],
				[300, 100]
			],
			lengthEnteredM: 30,
			crossSectionMm2: 0.75,
			fixings: 'clips'
		});
		decidePoint(doc, id, 'approved', decider);
	});
	await transitionSurvey(t.db, { organisationId: org, surveyId, name: 'submit', actor: tech });
	await transitionSurvey(t.db, { organisationId: org, surveyId, name: 'approve', actor: engineer, confirmExceptions: true });
});
afterAll(async () => t?.drop());

async function defaultInput(): Promise<IssueJobsInput> {
	const latest = (await approvedPointsOfLatestRevision(t.db, org, surveyId))!;
	const byMachine = new Map<string, Array<{ revisionBoardId: string; pointId: string }>>();
	for (const p of latest.points) {
		if (!byMachine.has(p.machine_id)) byMachine.set(p.machine_id, []);
		byMachine.get(p.machine_id)!.push({ revisionBoardId: p.revision_board_id, pointId: p.point_id });
	}
	return {
		revision: latest.revision.number,
		note: '',
		jobs: [...byMachine.values()].map((points, i) => ({
			title: null,
			assigneeUserId: tech.userId,
			outageStart: '2026-12-07T07:00:00.000Z',
			outageEnd: '2026-12-07T15:00:00.000Z',
			dueDate: i === 0 ? '2026-12-08' : '2026-12-20',
			lockoutRequested: false,
			notes: '',
			points
		}))
	};
}

describe('issuing jobs from the approved revision', () => {
	it('groups the approved points by machine; the rejected cowl point is not offered', async () => {
		const latest = (await approvedPointsOfLatestRevision(t.db, org, surveyId))!;
		expect(latest.revision.number).toBe(1);
		const groups = new Map<string, string[]>();
		for (const p of latest.points) groups.set(p.machine_tag!, [...(groups.get(p.machine_tag!) ?? []), p.label].sort());
		expect(Object.fromEntries(groups)).toEqual({ 'RW-P01': ['P1', 'P3'], 'RW-M01': ['P1'] });
	});

	it('refuses roles, other organisations, left-out and doubled points, and the bare transition', async () => {
		const input = await defaultInput();
		await expect(issueJobs(t.db, null, org, surveyId, tech, input)).rejects.toMatchObject({ status: 403 });
		const other = await t.db.insertInto('organisation').values({ name: 'Other Water (test)' }).returning('id').executeTakeFirstOrThrow();
		await expect(issueJobs(t.db, null, other.id, surveyId, engineer, input)).rejects.toMatchObject({ status: 404 });
		const leftOut = { ...input, jobs: [{ ...input.jobs[0], points: input.jobs[0].points.slice(1) }, input.jobs[1]] };
		await expect(issueJobs(t.db, null, org, surveyId, engineer, leftOut)).rejects.toMatchObject({ status: 400, message: /left out/ });
		const doubled = { ...input, jobs: [input.jobs[0], { ...input.jobs[1], points: [...input.jobs[1].points, input.jobs[0].points[0]] }] };
		await expect(issueJobs(t.db, null, org, surveyId, engineer, doubled)).rejects.toMatchObject({ status: 400, message: /two jobs/ });
		const badAssignee = { ...input, jobs: input.jobs.map((j) => ({ ...j, assigneeUserId: viewer.userId })) };
		await expect(issueJobs(t.db, null, org, surveyId, engineer, badAssignee)).rejects.toMatchObject({ status: 400 });
		const bare = await transitionSurvey(t.db, { organisationId: org, surveyId, name: 'issue_jobs', actor: engineer }).catch((e) => e);
		expect(bare).toBeInstanceOf(WorkflowError);
		expect(bare.status).toBe(409);
		expect(await t.db.selectFrom('installation_job').select('id').execute()).toHaveLength(0);
		expect((await t.db.selectFrom('survey').select('status').where('id', '=', surveyId).executeTakeFirstOrThrow()).status).toBe('approved');
	});

	it('issues one job per machine, mails the assignee and moves the survey to "jobs issued"', async () => {
		const created = await issueJobs(t.db, mail(), org, surveyId, engineer, await defaultInput());
		jobIds = created.map((c) => c.id);
		expect(created.map((c) => c.number)).toEqual([1, 2]);
		expect((await t.db.selectFrom('survey').select('status').where('id', '=', surveyId).executeTakeFirstOrThrow()).status).toBe(
			'jobs_issued'
		);
		const moves = await t.db.selectFrom('survey_transition').select('transition').where('survey_id', '=', surveyId).orderBy('id').execute();
		expect(moves.at(-1)!.transition).toBe('issue_jobs');
		const mails = await t.db.selectFrom('mail_outbox').selectAll().where('purpose', '=', 'job-assigned').execute();
		expect(mails.map((m) => m.to_address)).toEqual(['tech@harrowgate.example', 'tech@harrowgate.example']);
		expect(mails[0].subject).toMatch(/^Installation job J-0001/);
		expect(mails[0].body_text).toContain(`http://spotface.test/jobs/${jobIds[0]}`);
		expect(mails[0].body_text).toMatch(/lock out/);
		// Issued once: a second attempt is refused.
		await expect(issueJobs(t.db, null, org, surveyId, engineer, await defaultInput())).rejects.toMatchObject({ status: 409 });
	});

	it('each job carries the plan: lockout for a stud, checklist per method, aluminium engagement, materials summed', async () => {
		const [a, b] = await Promise.all(jobIds.map((id) => loadJob(t.db, org, id)));
		const pumpJob = [a!, b!].find((v) => v.points.length === 2)!;
		const motorJob = [a!, b!].find((v) => v.points.length === 1)!;

		// Lockout: always for drilling or tapping (PRODUCT.md installation checklist).
		expect(motorJob.job.lockoutRequired).toBe(true);
		expect(motorJob.plan.lockout.reasons.join(' ')).toMatch(/P1: drilling and tapping/);
		// Issued with the box unticked: the stud alone requires lockout, nobody asked for it.
		expect(motorJob.plan.lockout.reasons.join(' ')).not.toMatch(/Asked for by the engineer/);

		const p1 = pumpJob.points.find((p) => p.label === 'P1')!;
		const p3 = pumpJob.points.find((p) => p.label === 'P3')!;
		expect(p1.plan.checklist.map((s) => s.id)).toContain('drill-tap');
		expect(p1.plan.checklist.map((s) => s.id)).not.toContain('cure');
		expect(p3.plan.checklist.map((s) => s.id)).toContain('cure');
		expect(p3.plan.checklist.map((s) => s.id)).not.toContain('drill-tap');
		expect(p1.plan.torqueLimitNm).toBe(10); // TRADE.md default stud torque limit (common practice)

		// Aluminium: 2·d engagement for the M6 stud = 12 mm (TRADE.md, machine-design tables, common practice).
		const alu = motorJob.points[0];
		expect(alu.material).toBe('aluminium');
		expect(alu.plan.preparation.threadEngagementMm).toBe(12);
		expect(alu.plan.preparation.thread).toBe('M6');
		expect(alu.plan.preparation.tapDrillMm).toBe(5); // TRADE.md: tap drill 5.0 mm (common tables after ISO 2306)

		// Bill of materials: two sensors on the pump, one stud and one pad; the 18 m entered route
		// of P1 cut with the stated margin and rounded up to the metre: 18 × 1.15 = 20.7 → 21 m.
		const qty = (v: typeof pumpJob, item: RegExp) => v.plan.materials.filter((m) => item.test(m.item)).reduce((s, m) => s + m.quantity, 0);
		expect(qty(pumpJob, /^Vibration sensor/)).toBe(2);
		expect(qty(pumpJob, /^M6 mounting stud/)).toBe(1);
		expect(qty(pumpJob, /^Mounting pad/)).toBe(1);
		expect(pumpJob.plan.cableMargin).toBe(0.15);
		expect(qty(motorJob, /^Sensor cable, /)).toBe(Math.ceil(30 * 1.15)); // 34.5 → 35 m
		const p3Cable = p3.route?.lengthM;
		const expectedPumpCable = 21 + (p3Cable != null ? Math.ceil(p3Cable * 1.15) : 0);
		expect(qty(pumpJob, /^Sensor cable, /)).toBe(expectedPumpCable);
	});
});

describe('the as-installed record', () => {
	let pumpJobId: string;
	let p1: string;
	let p3: string;
	const good = {
		mounting: 'stud',
		torqueNm: 8,
		supplyV: 23.6,
		polarity: 'ok',
		readyAt: '2026-12-07T09:00:00Z',
		baselineStartAt: '2026-12-07T09:10:00Z',
		deviation: '',
		deviationReason: ''
	};
	const parse = (x: Record<string, unknown>) => recordPointSchema.parse(x);

	beforeAll(async () => {
		for (const id of jobIds) {
			const v = (await loadJob(t.db, org, id))!;
			if (v.points.length === 2) {
				pumpJobId = id;
				p1 = v.points.find((p) => p.label === 'P1')!.id;
				p3 = v.points.find((p) => p.label === 'P3')!.id;
			}
		}
	});

	it('finds over-torque, 19.8 V and reversed polarity (recomputed on the server)', async () => {
		const over = await recordPoint(t.db, org, pumpJobId, p1, tech, parse({ ...good, torqueNm: 12 }));
		expect(over.duplicate).toBe(false);
		if (over.duplicate) return;
		expect(over.findings.find((f) => f.rule === 'mounting.stud-torque')).toMatchObject({ severity: 'fail', value: 12, limit: 10 });
		// 19.8 V is below 20.4 V, the low end of 24 V DC −15 % (IEC 61131-2; percentages from memory).
		const low = await recordPoint(t.db, org, pumpJobId, p1, tech, parse({ ...good, supplyV: 19.8 }));
		if (low.duplicate) return;
		expect(low.findings.find((f) => f.rule === 'install.supply-voltage')).toMatchObject({ severity: 'fail', value: 19.8 });
		const reversed = await recordPoint(t.db, org, pumpJobId, p1, tech, parse({ ...good, polarity: 'reversed' }));
		if (reversed.duplicate) return;
		expect(reversed.findings.find((f) => f.rule === 'install.polarity')!.severity).toBe('fail');
		const stored = await t.db.selectFrom('job_point').select(['worst', 'polarity_ok']).where('id', '=', p1).executeTakeFirstOrThrow();
		expect(stored).toEqual({ worst: 'fail', polarity_ok: false });
	});

	it('the overview shows each role what is left: overdue and due jobs, the failing point, machines without an approved survey', async () => {
		// P1 is failing now (reversed polarity). On 9 December the pump job (due the 8th) is overdue;
		// the motor job (due the 20th) is not due within the week.
		const now = new Date(2026, 11, 9, 10, 0);
		const eng = await dashboardOf(t.db, org, engineer, now);
		const section = (all: typeof eng, id: string) => all.find((x) => x.id === id);
		expect(section(eng, 'overdue')!.lines.map((l) => l.href)).toEqual([`/jobs/${pumpJobId}`]);
		expect(section(eng, 'due')).toBeUndefined();
		expect(section(eng, 'failing')!.lines.map((l) => l.title)).toEqual(['J-0001 P1']);
		expect(section(eng, 'failing')!.lines[0].href).toBe(`/jobs/${pumpJobId}#point-${p1}`);
		const unsurveyed = section(eng, 'unsurveyed')!.lines.map((l) => l.title);
		expect(unsurveyed.some((x) => x.includes('RW-P01') || x.includes('RW-M01'))).toBe(false);
		expect(unsurveyed.length).toBeGreaterThan(0);
		expect(section(eng, 'review')).toBeUndefined();

		const mine = await dashboardOf(t.db, org, tech, now);
		expect(mine.map((x) => x.id)).toEqual(['failing', 'overdue']);
		const onTheSeventeenth = await dashboardOf(t.db, org, tech, new Date(2026, 11, 17, 10, 0));
		expect(section(onTheSeventeenth, 'due')!.lines.map((l) => l.title)[0]).toMatch(/^J-0002/);
		const readOnly = await dashboardOf(t.db, org, viewer, now);
		expect(readOnly.map((x) => x.id)).toEqual(['overdue']);
	});

	it('asks for a reason when the method differs from the plan, and for a baseline after ready', async () => {
		const r = await recordPoint(
			t.db,
			org,
			pumpJobId,
			p3,
			tech,
			parse({ ...good, mounting: 'stud', baselineStartAt: '2026-12-07T08:00:00Z' })
		);
		if (r.duplicate) return;
		expect(r.findings.find((f) => f.rule === 'install.deviation')!.severity).toBe('fail');
		expect(r.findings.find((f) => f.rule === 'install.baseline')!.severity).toBe('fail');
		expect(() => parse({ ...good, deviation: 'Stud instead of pad' })).toThrow(/Say why/);
		const ok = await recordPoint(
			t.db,
			org,
			pumpJobId,
			p3,
			tech,
			parse({ ...good, mounting: 'bonded_pad', torqueNm: null, recordKey: 'device-key-1' })
		);
		if (ok.duplicate) return;
		expect(ok.findings.filter((f) => f.severity === 'fail')).toEqual([]);
		expect(ok.findings.find((f) => f.rule === 'install.photo')!.severity).toBe('warn');
		// The same record sent again (an offline retry) is stored once.
		const again = await recordPoint(t.db, org, pumpJobId, p3, tech, parse({ ...good, supplyV: 26, recordKey: 'device-key-1' }));
		expect(again.duplicate).toBe(true);
		expect((await t.db.selectFrom('job_point').select('supply_v').where('id', '=', p3).executeTakeFirstOrThrow()).supply_v).toBe(23.6);
	});

	it("refuses viewers, technicians on someone else's job, and another organisation's job (404)", async () => {
		await expect(recordPoint(t.db, org, pumpJobId, p1, viewer, parse(good))).rejects.toMatchObject({ status: 403 });
		const other = await t.db
			.insertInto('app_user')
			.values({ id: 'u-other-tech', email: 'other.tech@harrowgate.example', name: 'Other Tech', password_hash: 'x' })
			.returning('id')
			.executeTakeFirstOrThrow();
		await t.db.insertInto('member').values({ organisation_id: org, user_id: other.id, role: 'technician' }).execute();
		await expect(recordPoint(t.db, org, pumpJobId, p1, { userId: other.id, role: 'technician' }, parse(good))).rejects.toMatchObject({
			status: 403
		});
		const otherOrg = await t.db.insertInto('organisation').values({ name: 'Third Water (test)' }).returning('id').executeTakeFirstOrThrow();
		await expect(recordPoint(t.db, otherOrg.id, pumpJobId, p1, engineer, parse(good))).rejects.toMatchObject({ status: 404 });
		expect(await loadJob(t.db, otherOrg.id, pumpJobId)).toBeNull();
	});

	it('closing is refused while a point fails, unless the engineer records why; the last job closes the survey', async () => {
		await expect(closeJob(t.db, org, pumpJobId, tech, '')).rejects.toMatchObject({ status: 403 });
		const refused = await closeJob(t.db, org, pumpJobId, engineer, '').catch((e) => e);
		expect(refused).toBeInstanceOf(JobError);
		expect(refused.status).toBe(409);
		expect(refused.blockers.map((b: { label: string }) => b.label)).toEqual(['P1']);
		// Put P1 right: then it closes without a note.
		await recordPoint(t.db, org, pumpJobId, p1, tech, parse(good));
		const closed = await closeJob(t.db, org, pumpJobId, engineer, '');
		expect(closed.surveyClosed).toBe(false);
		await expect(recordPoint(t.db, org, pumpJobId, p1, tech, parse(good))).rejects.toMatchObject({ status: 409 });

		// The motor job has an unrecorded point: refused without a reason, closed with one.
		const motorJobId = jobIds.find((id) => id !== pumpJobId)!;
		await expect(closeJob(t.db, org, motorJobId, engineer, '  ')).rejects.toMatchObject({ status: 409 });
		const withReason = await closeJob(t.db, org, motorJobId, engineer, 'Motor replaced under warranty; its sensor goes on the new one.');
		expect(withReason.overridden.map((b) => b.label)).toEqual(['P1']);
		expect(withReason.surveyClosed).toBe(true);
		expect((await t.db.selectFrom('survey').select('status').where('id', '=', surveyId).executeTakeFirstOrThrow()).status).toBe('closed');
	});
});

describe('exports', () => {
	it('the points CSV round-trips through papaparse; the JSON holds every point with its record', async () => {
		const views = (await Promise.all(jobIds.map((id) => loadJob(t.db, org, id)))).map((v) => v!);
		const text = pointsToCsv(views);
		const parsed = Papa.parse<Record<string, string>>(text.replace(/^\uFEFF/, ''), { header: true, skipEmptyLines: true });
		expect(parsed.errors).toEqual([]);
		expect(parsed.meta.fields).toEqual([...POINT_CSV_COLUMNS]);
		const expected = views.flatMap((v) =>
			v.points.map((p) => ({
				job: v.job.reference,
				label: p.label,
				mounting: p.mounting,
				torque: p.record?.torqueNm == null ? '' : String(p.record.torqueNm),
				supply: p.record?.supplyV == null ? '' : String(p.record.supplyV),
				worst: p.record?.worst ?? ''
			}))
		);
		expect(
			parsed.data.map((r) => ({
				job: r.job,
				label: r.label,
				mounting: r.mounting,
				torque: r.torque_nm,
				supply: r.supply_v,
				worst: r.record_worst
			}))
		).toEqual(expected);
		expect(parsed.data.find((r) => r.job === views[0].job.reference && r.label === 'P1')).toBeTruthy();

		const jobsCsv = Papa.parse<Record<string, string>>(jobsToCsv(views).replace(/^\uFEFF/, ''), { header: true, skipEmptyLines: true });
		expect(jobsCsv.data.map((r) => [r.reference, r.status, r.points, r.lockout_required])).toEqual(
			views.map((v) => [v.job.reference, 'closed', String(v.points.length), 'yes'])
		);

		const json = JSON.parse(JSON.stringify(jobsToJson(views)));
		expect(json.jobs.map((j: { reference: string; points: unknown[] }) => [j.reference, j.points.length])).toEqual(
			views.map((v) => [v.job.reference, v.points.length])
		);
		expect(json.jobs[0].points[0].checklist.length).toBeGreaterThan(5);
	});

	it('a cell that a spreadsheet would run as a formula is guarded', async () => {
		const v = (await loadJob(t.db, org, jobIds[0]))!;
		const hostile = { ...v, job: { ...v.job, title: '=HYPERLINK("http://x.example")' } };
		const row = Papa.parse<Record<string, string>>(jobsToCsv([hostile]).replace(/^\uFEFF/, ''), { header: true }).data[0];
		expect(row.title.startsWith("'=")).toBe(true);
	});
});

/** The PDF read back with pdfjs-dist: each page's size, text (white space collapsed) and painted images. */
async function readPdf(bytes: Uint8Array) {
	const pdf = await getDocument({ data: bytes.slice(), useSystemFonts: false, isEvalSupported: false }).promise;
	const pages: Array<{ width: number; height: number; text: string; images: number }> = [];
	for (let i = 1; i <= pdf.numPages; i++) {
		const page = await pdf.getPage(i);
		const [x0, y0, x1, y1] = page.view;
		const content = await page.getTextContent();
		const text = content.items
			.map((it) => ('str' in it ? it.str + (it.hasEOL ? '\n' : '') : ''))
			.join('')
			.replace(/\s+/g, ' ');
		const ops = await page.getOperatorList();
		pages.push({ width: x1 - x0, height: y1 - y0, text, images: ops.fnArray.filter((op) => op === OPS.paintImageXObject).length });
	}
	await pdf.destroy();
	return pages;
}

describe('the job pack from the job rows', { timeout: 60_000 }, () => {
	it('holds every point label, the cautions and the board photo; A4 and Letter', async () => {
		const views = (await Promise.all(jobIds.map((id) => loadJob(t.db, org, id)))).map((v) => v!);
		const pump = views.find((v) => v.points.length === 2)!;
		const photos = await boardPhotos(t.db, storage, org, pump);
		expect([...photos.values()].filter(Boolean)).toHaveLength(1); // the demo pump's photo
		const input = jobPackInputOf(pump, photos, { paper: 'A4' });
		expect(input.points.map((p) => [p.number, p.label])).toEqual(pump.points.map((p) => [p.number, p.label]));
		expect(input.boards[0].routes.map((r) => r.pointNumber).sort()).toEqual(
			pump.points
				.filter((p) => p.route)
				.map((p) => p.number)
				.sort()
		);
		expect(input.boards[0].zones.map((z) => z.label)).toEqual(['Coupling']);

		const pages = await readPdf(await renderJobPack(input));
		// ISO 216 A4: 595.28 × 841.89 pt.
		expect(pages[0].width).toBeCloseTo(595.28, 1);
		expect(pages[0].height).toBeCloseTo(841.89, 1);
		const text = pages.map((p) => p.text).join(' ');
		expect(text).toContain(pump.job.reference);
		for (const p of pump.points) expect(text).toContain(p.label);
		for (const c of SAFETY_CAUTIONS) expect(text).toContain(c.text);
		expect(pages.reduce((n, p) => n + p.images, 0)).toBeGreaterThanOrEqual(1);

		const letter = await readPdf(await renderJobPack(jobPackInputOf(pump, photos, { paper: 'Letter' })));
		// US Letter: 8.5 × 11 in = 612 × 792 pt.
		expect([letter[0].width, letter[0].height]).toEqual([612, 792]);
	});
});
