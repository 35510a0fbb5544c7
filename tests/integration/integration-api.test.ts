// The integration API as an outside system uses it: tokens made by an admin on the settings page
// (read-only tokens never write, revoked and expired ones are refused with the reason), another
// organisation's rows are 404, idempotent POSTs create one record, the approved-revisions feed
// pages in a stable order, and a webhook delivery verifies with its secret and reaches a receiver
// that failed twice on the third attempt.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { createBoardFixture, PASSWORD, type BoardFixture } from '../helpers/collab';
import { seedDemo, DEMO_ORG, DEMO_PASSWORD } from '../../src/lib/server/db/seed';
import { DEMO_SURVEY } from '../../src/lib/server/db/seed-survey';
import { diskStorage } from '../../src/lib/server/storage/index';
import { startWebhookReceiver } from '../../src/lib/server/integration/test-receiver';
import { verifyWebhook } from '../../src/lib/server/integration/webhook-signature';
import { issueJobs } from '../../src/lib/server/jobs/service';
import { approvedPointsOfLatestRevision } from '../../src/lib/server/jobs/repository';

let t: TestDatabase;
let app: RunningApp;
let receiver: Awaited<ReturnType<typeof startWebhookReceiver>>;
let admin: Client;
let org: string;
let surveyId: string;
let other: BoardFixture;

beforeAll(async () => {
	t = await createTestDatabase();
	await seedDemo(t.db, [], { storage: diskStorage(mkdtempSync(join(tmpdir(), 'spotface-api-'))), states: false });
	org = (await t.db.selectFrom('organisation').select('id').where('name', '=', DEMO_ORG).executeTakeFirstOrThrow()).id;
	surveyId = (
		await t.db
			.selectFrom('survey')
			.select('id')
			.where('organisation_id', '=', org)
			.where('title', '=', DEMO_SURVEY)
			.executeTakeFirstOrThrow()
	).id;
	other = await createBoardFixture(t.db, { name: 'Elsewhere Water' });
	receiver = await startWebhookReceiver();
	app = await startApp({
		databaseUrl: t.url,
		env: { WEBHOOK_ALLOW_PRIVATE: 'loopback', WEBHOOK_RETRY_DELAY_SEC: '1', WEBHOOK_RETRY_LIMIT: '4', QUEUE_POLL_SECONDS: '0.5' }
	});
	admin = new Client(app.url);
	await admin.signIn('admin@harrowgate.example', DEMO_PASSWORD);
});
afterAll(async () => {
	await app?.stop();
	await receiver?.close();
	await t?.drop();
});

/** Creates a token on the settings page as the admin (as a browser without JavaScript would) and returns the secret shown once. */
async function makeToken(c: Client, fields: Record<string, string>): Promise<string> {
	const res = await c.form('/settings/integration?/createToken', { expiresInDays: '30', ...fields });
	const html = await res.text();
	expect(res.status, html.slice(0, 300)).toBe(200);
	const m = html.match(/spf_[A-Za-z0-9_-]{20,}/);
	if (!m) throw new Error(`no token on the page: ${html.slice(0, 500)}`);
	return m[0];
}

/** A request from an outside system: the token, no cookie, no Origin. */
function api(token: string, method: string, path: string, body?: unknown, headers: Record<string, string> = {}) {
	return fetch(app.url + path, {
		method,
		headers: { authorization: `Bearer ${token}`, ...(body !== undefined ? { 'content-type': 'application/json' } : {}), ...headers },
		body: body === undefined ? undefined : JSON.stringify(body)
	});
}

const userId = async (email: string) =>
	(await t.db.selectFrom('app_user').select('id').where('email', '=', email).executeTakeFirstOrThrow()).id;
const sitesNamed = (name: string) =>
	t.db.selectFrom('site').select('id').where('organisation_id', '=', org).where('name', '=', name).execute();

let readToken: string;
let writeToken: string;
let techToken: string;

describe('tokens', () => {
	it('an admin makes tokens for a service and for a person; only the hash is stored', async () => {
		readToken = await makeToken(admin, { kind: 'service', name: 'Maintenance system (read)', role: 'engineer', scope: 'read' });
		writeToken = await makeToken(admin, { kind: 'service', name: 'Maintenance system', role: 'engineer', scope: 'read_write' });
		techToken = await makeToken(admin, {
			kind: 'person',
			name: 'Tablet script',
			userId: await userId('tech@harrowgate.example'),
			scope: 'read_write'
		});
		const rows = await t.db
			.selectFrom('api_token')
			.select(['token_hash', 'prefix', 'kind', 'role'])
			.where('organisation_id', '=', org)
			.execute();
		expect(rows).toHaveLength(3);
		for (const secret of [readToken, writeToken, techToken]) {
			expect(rows.some((r) => r.token_hash === secret)).toBe(false);
			expect(rows.some((r) => secret.startsWith(r.prefix))).toBe(true);
		}
		// The page lists them afterwards without the secret.
		const page = await (await admin.get('/settings/integration')).text();
		expect(page).toContain('Maintenance system (read)');
		expect(page).not.toContain(readToken);
	});

	it('a non-admin cannot reach the settings page or make tokens', async () => {
		const eng = new Client(app.url);
		await eng.signIn('engineer@harrowgate.example', DEMO_PASSWORD);
		expect((await eng.get('/settings/integration')).status).toBe(403);
		expect(
			(
				await eng.form('/settings/integration?/createToken', {
					kind: 'service',
					name: 'x',
					role: 'engineer',
					scope: 'read_write',
					expiresInDays: '5'
				})
			).status
		).toBe(403);
		expect(await t.db.selectFrom('api_token').select('id').where('name', '=', 'x').execute()).toHaveLength(0);
	});

	it('a read token reads but cannot write (403, nothing created), and its last use is recorded', async () => {
		const list = await api(readToken, 'GET', '/api/v1/sites');
		expect(list.status).toBe(200);
		const post = await api(readToken, 'POST', '/api/v1/sites', { name: 'Read token site' });
		expect(post.status).toBe(403);
		expect((await post.json()).detail).toMatch(/read-only/);
		const site = (await list.json()).items[0];
		expect((await api(readToken, 'PATCH', `/api/v1/sites/${site.id}`, { name: 'Renamed by a read token' })).status).toBe(403);
		expect((await api(readToken, 'DELETE', `/api/v1/sites/${site.id}`)).status).toBe(403);
		expect((await api(readToken, 'POST', `/api/v1/surveys/${surveyId}/transitions`, { transition: 'submit' })).status).toBe(403);
		expect(await sitesNamed('Read token site')).toHaveLength(0);
		expect(await t.db.selectFrom('site').select('id').where('name', '=', 'Renamed by a read token').execute()).toHaveLength(0);
		const used = await t.db
			.selectFrom('api_token')
			.select('last_used_at')
			.where('name', '=', 'Maintenance system (read)')
			.executeTakeFirstOrThrow();
		expect(used.last_used_at).not.toBeNull();
	});

	it('a read-write token writes without a cookie or an Origin header, as its service account', async () => {
		const res = await api(writeToken, 'POST', '/api/v1/sites', { name: 'Token site' });
		expect(res.status).toBe(201);
		const audit = await t.db
			.selectFrom('audit_event')
			.innerJoin('app_user', 'app_user.id', 'audit_event.actor_user_id')
			.select('app_user.name')
			.where('audit_event.action', '=', 'site.created')
			.where('audit_event.subject_id', '=', (await res.json()).id)
			.executeTakeFirstOrThrow();
		expect(audit.name).toBe('Maintenance system');
	});

	it('a cookie request keeps its cross-site protection', async () => {
		const evil = { origin: 'http://evil.example', 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' };
		const form = await admin.request('/settings/integration?/createToken', {
			method: 'POST',
			headers: evil,
			body: new URLSearchParams({
				kind: 'service',
				name: 'Cross-site',
				role: 'engineer',
				scope: 'read_write',
				expiresInDays: '5'
			}).toString()
		});
		expect(form.status).toBe(403);
		const json = await admin.request('/api/v1/sites', {
			method: 'POST',
			headers: { origin: 'http://evil.example', 'content-type': 'application/json' },
			body: JSON.stringify({ name: 'Cross-site site' })
		});
		expect(json.status).toBe(403);
		// Without an Origin header a form post is refused too (as SvelteKit's own check did).
		const noOrigin = await fetch(app.url + '/settings/integration?/createToken', {
			method: 'POST',
			headers: { cookie: `spotface_session=${admin.sessionCookie}`, 'content-type': 'application/x-www-form-urlencoded' },
			body: 'kind=service&name=NoOrigin&role=engineer&scope=read&expiresInDays=5'
		});
		expect(noOrigin.status).toBe(403);
		expect(await t.db.selectFrom('api_token').select('id').where('name', 'in', ['Cross-site', 'NoOrigin']).execute()).toHaveLength(0);
		expect(await sitesNamed('Cross-site site')).toHaveLength(0);
		// A session cookie sent with a bad Authorization header does not fall back to the cookie.
		const mixed = await admin.request('/api/v1/sites', { headers: { authorization: 'Bearer spf_nonsense' } });
		expect(mixed.status).toBe(401);
	});

	it('revoked, expired and unknown tokens are refused with 401 and the reason', async () => {
		const doomed = await makeToken(admin, { kind: 'service', name: 'Doomed', role: 'viewer', scope: 'read' });
		const aging = await makeToken(admin, { kind: 'service', name: 'Aging', role: 'viewer', scope: 'read' });
		expect((await api(doomed, 'GET', '/api/v1/sites')).status).toBe(200);
		const id = (await t.db.selectFrom('api_token').select('id').where('name', '=', 'Doomed').executeTakeFirstOrThrow()).id;
		expect((await admin.form('/settings/integration?/revokeToken', { id })).status).toBe(200);
		const revoked = await api(doomed, 'GET', '/api/v1/sites');
		expect(revoked.status).toBe(401);
		expect(revoked.headers.get('www-authenticate')).toMatch(/Bearer/);
		expect((await revoked.json()).detail).toMatch(/revoked/);

		await t.db
			.updateTable('api_token')
			.set({ expires_at: new Date(Date.now() - 1000) })
			.where('name', '=', 'Aging')
			.execute();
		const expired = await api(aging, 'GET', '/api/v1/sites');
		expect(expired.status).toBe(401);
		expect((await expired.json()).detail).toMatch(/expired/);

		const unknown = await api('spf_' + 'x'.repeat(43), 'GET', '/api/v1/sites');
		expect(unknown.status).toBe(401);
		expect((await unknown.json()).detail).toMatch(/not known/);
		const basic = await fetch(app.url + '/api/v1/sites', { headers: { authorization: 'Basic YTpi' } });
		expect(basic.status).toBe(401);
		expect((await basic.json()).detail).toMatch(/Bearer/);
	});

	it("a person's token stops working when they leave the organisation", async () => {
		const viewerId = await userId('viewer@harrowgate.example');
		const token = await makeToken(admin, { kind: 'person', name: 'Viewer script', userId: viewerId, scope: 'read' });
		expect((await api(token, 'GET', '/api/v1/sites')).status).toBe(200);
		await t.db.deleteFrom('member').where('organisation_id', '=', org).where('user_id', '=', viewerId).execute();
		const res = await api(token, 'GET', '/api/v1/sites');
		expect(res.status).toBe(401);
		expect((await res.json()).detail).toMatch(/no longer a member/);
	});
});

describe('idempotency keys', () => {
	it('a replay with the same key and body creates one record and answers the same', async () => {
		const key = 'site-create-0001';
		const first = await api(writeToken, 'POST', '/api/v1/sites', { name: 'Idempotent site' }, { 'idempotency-key': key });
		expect(first.status).toBe(201);
		const a = await first.json();
		const second = await api(writeToken, 'POST', '/api/v1/sites', { name: 'Idempotent site' }, { 'idempotency-key': key });
		expect(second.status).toBe(201);
		expect(second.headers.get('idempotent-replayed')).toBe('true');
		expect(second.headers.get('location')).toBe(first.headers.get('location'));
		expect((await second.json()).id).toBe(a.id);
		expect(await sitesNamed('Idempotent site')).toHaveLength(1);
	});

	it('the same key with another body is 422 and runs nothing', async () => {
		const key = 'site-create-0002';
		expect((await api(writeToken, 'POST', '/api/v1/sites', { name: 'Keyed site' }, { 'idempotency-key': key })).status).toBe(201);
		const res = await api(writeToken, 'POST', '/api/v1/sites', { name: 'Another keyed site' }, { 'idempotency-key': key });
		expect(res.status).toBe(422);
		expect((await res.json()).detail).toMatch(/different request/);
		expect(await sitesNamed('Another keyed site')).toHaveLength(0);
	});

	it('a key that is too long is a 400 and runs nothing', async () => {
		const bad = await api(writeToken, 'POST', '/api/v1/sites', { name: 'Bad key' }, { 'idempotency-key': 'x'.repeat(300) });
		expect(bad.status).toBe(400);
		expect(await sitesNamed('Bad key')).toHaveLength(0);
	});

	it('works for session requests too (the key is per organisation)', async () => {
		const headers = { 'content-type': 'application/json', 'idempotency-key': 'session-key-1' };
		const body = JSON.stringify({ name: 'Session keyed site' });
		const r1 = await admin.request('/api/v1/sites', { method: 'POST', headers, body });
		const r2 = await admin.request('/api/v1/sites', { method: 'POST', headers, body });
		expect([r1.status, r2.status]).toEqual([201, 201]);
		expect(await sitesNamed('Session keyed site')).toHaveLength(1);
	});
});

describe('approved revisions feed and webhooks', () => {
	let secret: string;
	const started = new Date(Date.now() - 60_000).toISOString();

	it('refuses webhook URLs outside the policy and registers one on loopback', async () => {
		for (const url of ['ftp://127.0.0.1/x', 'http://10.0.0.8/hook', 'http://169.254.169.254/latest/meta-data']) {
			const res = await admin.form('/settings/integration?/createWebhook', { url, events: 'revision.approved' });
			expect(res.status, url).toBe(400);
		}
		const res = await admin.form('/settings/integration?/createWebhook', {
			url: receiver.url,
			events: 'revision.approved',
			description: 'Test receiver'
		});
		expect(res.status).toBe(200);
		const m = (await res.text()).match(/whsec_[A-Za-z0-9_-]{20,}/);
		expect(m).not.toBeNull();
		secret = m![0];
		expect(await t.db.selectFrom('webhook').select('id').where('organisation_id', '=', org).execute()).toHaveLength(1);
	});

	it('approving over the API sends a signed delivery; a receiver failing twice gets the third attempt', async () => {
		receiver.failNext(2);
		const submit = await api(techToken, 'POST', `/api/v1/surveys/${surveyId}/transitions`, { transition: 'submit', note: 'Points marked' });
		expect(submit.status).toBe(200);
		const approve = await api(
			writeToken,
			'POST',
			`/api/v1/surveys/${surveyId}/transitions`,
			{ transition: 'approve', confirmExceptions: true },
			{ 'idempotency-key': 'approve-1' }
		);
		expect(approve.status).toBe(200);
		const revision = (await approve.json()).revision;
		expect(revision.number).toBe(1);

		const got = await receiver.waitFor(3, 40_000);
		expect(got.map((g) => g.answered)).toEqual([500, 500, 204]);
		for (const g of got) {
			expect(verifyWebhook(secret, { get: (n) => (g.headers[n] as string | undefined) ?? null }, g.body)).toEqual({ ok: true });
			expect(verifyWebhook('whsec_wrong', { get: (n) => (g.headers[n] as string | undefined) ?? null }, g.body).ok).toBe(false);
		}
		const event = JSON.parse(got[2].body);
		expect(event.type).toBe('revision.approved');
		expect(event.data.revision).toMatchObject({ id: revision.id, number: 1 });
		expect(event.data.survey.id).toBe(surveyId);
		expect(new Set(got.map((g) => JSON.parse(g.body).id)).size).toBe(1); // the same event each time

		let row;
		for (let i = 0; i < 50; i++) {
			row = await t.db.selectFrom('webhook_delivery').selectAll().where('organisation_id', '=', org).executeTakeFirstOrThrow();
			if (row.status === 'delivered') break;
			await new Promise((r) => setTimeout(r, 100));
		}
		expect(row).toMatchObject({ status: 'delivered', attempts: 3, last_status_code: 204 });
		const page = await (await admin.get('/settings/integration')).text();
		expect(page).toContain('delivered');

		// Replaying the approval with its key answers the same and approves nothing twice.
		const replay = await api(
			writeToken,
			'POST',
			`/api/v1/surveys/${surveyId}/transitions`,
			{ transition: 'approve', confirmExceptions: true },
			{ 'idempotency-key': 'approve-1' }
		);
		expect(replay.status).toBe(200);
		expect((await replay.json()).revision.id).toBe(revision.id);
		expect(await t.db.selectFrom('survey_revision').select('id').where('survey_id', '=', surveyId).execute()).toHaveLength(1);
	});

	it('lists approved revisions since a time in a stable order with a cursor, and fetches one with its points', async () => {
		// Revision 2: reopen, submit, approve again.
		for (const [token, body] of [
			[writeToken, { transition: 'reopen', note: 'One more point' }],
			[techToken, { transition: 'submit' }],
			[writeToken, { transition: 'approve', confirmExceptions: true }]
		] as const) {
			expect((await api(token, 'POST', `/api/v1/surveys/${surveyId}/transitions`, body)).status).toBe(200);
		}
		const page1 = await api(readToken, 'GET', `/api/v1/revisions?since=${encodeURIComponent(started)}&limit=1`);
		expect(page1.status).toBe(200);
		const p1 = await page1.json();
		expect(p1.items.map((r: { number: number }) => r.number)).toEqual([1]);
		expect(p1.nextCursor).toBeTruthy();
		const p2 = await (
			await api(readToken, 'GET', `/api/v1/revisions?since=${encodeURIComponent(started)}&limit=1&cursor=${p1.nextCursor}`)
		).json();
		expect(p2.items.map((r: { number: number }) => r.number)).toEqual([2]);
		expect(p2.nextCursor).toBeNull();
		const future = await (
			await api(readToken, 'GET', `/api/v1/revisions?since=${encodeURIComponent(new Date(Date.now() + 60_000).toISOString())}`)
		).json();
		expect(future.items).toEqual([]);
		expect((await api(readToken, 'GET', '/api/v1/revisions?since=yesterday')).status).toBe(400);
		expect((await api(readToken, 'GET', '/api/v1/revisions?cursor=garbage')).status).toBe(400);

		const detail = await api(readToken, 'GET', p1.items[0].href);
		expect(detail.status).toBe(200);
		const d = await detail.json();
		expect(d.number).toBe(1);
		expect(d.points.map((p: { label: string }) => p.label).sort()).toEqual(['P1', 'P2', 'P3']);
		expect(d.points.every((p: { findings: unknown[] }) => Array.isArray(p.findings))).toBe(true);
		// Two webhook events now: one per approval.
		await receiver.waitFor(4, 20_000);
	});

	it("another organisation's revision and rows are 404 for a token", async () => {
		const rows = await t.db.selectFrom('survey_revision').select('id').where('organisation_id', '=', org).execute();
		const otherAdmin = new Client(app.url);
		await otherAdmin.signIn(other.people.admin.email, PASSWORD);
		const otherToken = await makeToken(otherAdmin, { kind: 'service', name: 'Elsewhere system', role: 'engineer', scope: 'read_write' });
		for (const r of rows) expect((await api(otherToken, 'GET', `/api/v1/revisions/${r.id}`)).status).toBe(404);
		expect((await (await api(otherToken, 'GET', '/api/v1/revisions')).json()).items).toEqual([]);
		const site = (await t.db.selectFrom('site').select('id').where('organisation_id', '=', org).executeTakeFirstOrThrow()).id;
		expect((await api(otherToken, 'GET', `/api/v1/sites/${site}`)).status).toBe(404);
		expect((await api(otherToken, 'PATCH', `/api/v1/sites/${site}`, { name: 'Taken over' })).status).toBe(404);
		expect((await api(otherToken, 'POST', `/api/v1/surveys/${surveyId}/transitions`, { transition: 'reopen', note: 'x' })).status).toBe(
			404
		);
		// Its revoke form cannot touch our tokens either.
		const ours = (await t.db.selectFrom('api_token').select('id').where('name', '=', 'Maintenance system').executeTakeFirstOrThrow()).id;
		expect((await otherAdmin.form('/settings/integration?/revokeToken', { id: ours })).status).toBe(404);
		expect((await api(writeToken, 'GET', '/api/v1/sites')).status).toBe(200);
	});

	it('lists jobs changed since, fetches one with its points, records a point idempotently, and gives the pack', async () => {
		// Fixture: the points of revision 2 count as approved (as if decided on the board), then the engineer issues one job.
		const rev2 = await t.db
			.selectFrom('survey_revision')
			.select('id')
			.where('survey_id', '=', surveyId)
			.where('number', '=', 2)
			.executeTakeFirstOrThrow();
		await t.db.updateTable('revision_point').set({ status: 'approved', decision: 'approved' }).where('revision_id', '=', rev2.id).execute();
		const latest = (await approvedPointsOfLatestRevision(t.db, org, surveyId))!;
		const since = new Date(Date.now() - 1000).toISOString();
		const [job] = await issueJobs(
			t.db,
			null,
			org,
			surveyId,
			{ userId: await userId('engineer@harrowgate.example'), role: 'engineer' },
			{
				revision: 2,
				note: '',
				jobs: [
					{
						title: null,
						assigneeUserId: null,
						outageStart: null,
						outageEnd: null,
						dueDate: null,
						lockoutRequested: false,
						notes: '',
						points: latest.points.map((p) => ({ revisionBoardId: p.revision_board_id, pointId: p.point_id }))
					}
				]
			}
		);
		const feed = await (await api(readToken, 'GET', `/api/v1/jobs?since=${encodeURIComponent(since)}`)).json();
		expect(feed.items.map((j: { id: string }) => j.id)).toEqual([job.id]);
		const detail = await (await api(readToken, 'GET', `/api/v1/jobs/${job.id}`)).json();
		expect(detail.jobPoints).toHaveLength(3);
		expect(detail.jobPoints[0]).toHaveProperty('preparation');
		expect(detail.jobPoints[0].record).toBeNull();
		const point = detail.jobPoints[0].id;
		const record = {
			mounting: 'stud',
			torqueNm: 8,
			supplyV: 23.6,
			polarity: 'ok',
			readyAt: '2026-03-03T09:40:00Z',
			baselineStartAt: '2026-03-03T10:00:00Z'
		};
		// A read token cannot record; a read-write token can, and a replay with its key stores one record.
		expect((await api(readToken, 'POST', `/api/v1/jobs/${job.id}/points/${point}/record`, record)).status).toBe(403);
		const r1 = await api(writeToken, 'POST', `/api/v1/jobs/${job.id}/points/${point}/record`, record, { 'idempotency-key': 'rec-1' });
		expect(r1.status).toBe(200);
		const body1 = await r1.json();
		expect(Array.isArray(body1.findings)).toBe(true);
		const recordedAt = (await t.db.selectFrom('job_point').select('recorded_at').where('id', '=', point).executeTakeFirstOrThrow())
			.recorded_at;
		const r2 = await api(writeToken, 'POST', `/api/v1/jobs/${job.id}/points/${point}/record`, record, { 'idempotency-key': 'rec-1' });
		expect(r2.headers.get('idempotent-replayed')).toBe('true');
		expect(await r2.json()).toEqual(body1);
		expect(
			(await t.db.selectFrom('job_point').select('recorded_at').where('id', '=', point).executeTakeFirstOrThrow()).recorded_at
		).toEqual(recordedAt);
		// Bad input gets the tablet form's messages.
		const bad = await api(writeToken, 'POST', `/api/v1/jobs/${job.id}/points/${point}/record`, { ...record, supplyV: 'lots' });
		expect(bad.status).toBe(400);
		expect((await bad.json()).errors.supplyV).toBeTruthy();
		const pack = await api(readToken, 'GET', `/api/v1/jobs/${job.id}/pack`);
		expect(pack.status).toBe(200);
		expect(pack.headers.get('content-type')).toBe('application/pdf');
		expect(
			Buffer.from(await pack.arrayBuffer())
				.subarray(0, 5)
				.toString()
		).toBe('%PDF-');
		// Another organisation's token sees none of it.
		const otherAdmin = new Client(app.url);
		await otherAdmin.signIn(other.people.admin.email, PASSWORD);
		const otherToken = await makeToken(otherAdmin, { kind: 'service', name: 'Elsewhere jobs', role: 'engineer', scope: 'read_write' });
		expect((await api(otherToken, 'GET', `/api/v1/jobs/${job.id}`)).status).toBe(404);
		expect((await api(otherToken, 'GET', `/api/v1/jobs/${job.id}/pack`)).status).toBe(404);
		expect((await api(otherToken, 'POST', `/api/v1/jobs/${job.id}/points/${point}/record`, record)).status).toBe(404);
		expect((await (await api(otherToken, 'GET', '/api/v1/jobs')).json()).items).toEqual([]);
	});

	it('serves the OpenAPI document to a token', async () => {
		const res = await api(readToken, 'GET', '/api/v1/openapi.json');
		expect(res.status).toBe(200);
		const doc = await res.json();
		expect(doc.openapi).toBe('3.1.0');
		expect(doc.paths['/api/v1/revisions'].get).toBeTruthy();
		const page = await admin.get('/api-reference');
		expect(page.status).toBe(200);
		expect(await page.text()).toContain('/api/v1/revisions');
	});
});
