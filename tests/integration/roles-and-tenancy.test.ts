import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { startTestMail } from '../helpers/mail';
import { Client } from '../helpers/http';
import { hashPassword } from '../../src/lib/server/auth/password';
import type { Role } from '../../src/lib/server/db/types';

let t: TestDatabase;
let app: RunningApp;
let mail: Awaited<ReturnType<typeof startTestMail>>;
const PW = 'role test pass 1';
const clients = {} as Record<Role, Client>;
let orgA: string;
let orgB: string;
let bAdmin: Client;
let bMemberId: string;
let bInvitationId: string;

async function makeOrg(name: string, roles: Role[]) {
	const org = await t.db.insertInto('organisation').values({ name }).returning('id').executeTakeFirstOrThrow();
	const hash = await hashPassword(PW);
	const ids: Record<string, string> = {};
	for (const role of roles) {
		const id = `${name.slice(0, 3).toLowerCase()}-${role}`;
		await t.db
			.insertInto('app_user')
			.values({ id, email: `${role}@${name.toLowerCase()}.test`, name: `${name} ${role}`, password_hash: hash })
			.execute();
		const m = await t.db
			.insertInto('member')
			.values({ organisation_id: org.id, user_id: id, role })
			.returning('id')
			.executeTakeFirstOrThrow();
		ids[role] = m.id;
	}
	return { id: org.id, memberIds: ids };
}

beforeAll(async () => {
	t = await createTestDatabase();
	mail = await startTestMail();
	app = await startApp({ databaseUrl: t.url, env: mail.env });
	const a = await makeOrg('Alpha', ['admin', 'engineer', 'technician', 'viewer']);
	const b = await makeOrg('Bravo', ['admin', 'technician']);
	orgA = a.id;
	orgB = b.id;
	bMemberId = b.memberIds.technician;
	for (const role of ['admin', 'engineer', 'technician', 'viewer'] as Role[]) {
		clients[role] = new Client(app.url);
		await clients[role].signIn(`${role}@alpha.test`, PW);
	}
	bAdmin = new Client(app.url);
	await bAdmin.signIn('admin@bravo.test', PW);
	const inv = await (await bAdmin.json('POST', '/api/v1/invitations', { email: 'new@bravo.test', role: 'viewer' })).json();
	bInvitationId = inv.id;
});
afterAll(async () => {
	await app?.stop();
	await mail?.close();
	await t?.drop();
});

describe('role matrix through HTTP', () => {
	// Each guarded request, with the roles that may make it (others get 403).
	const cases: Array<{ name: string; allowed: Role[]; run: (c: Client) => Promise<Response> }> = [
		{ name: 'GET /api/v1/members', allowed: ['admin', 'engineer', 'technician', 'viewer'], run: (c) => c.json('GET', '/api/v1/members') },
		{
			name: 'GET /api/v1/organisation',
			allowed: ['admin', 'engineer', 'technician', 'viewer'],
			run: (c) => c.json('GET', '/api/v1/organisation')
		},
		{ name: 'PATCH /api/v1/organisation', allowed: ['admin'], run: (c) => c.json('PATCH', '/api/v1/organisation', { name: 'Alpha' }) },
		{ name: 'GET /api/v1/invitations', allowed: ['admin'], run: (c) => c.json('GET', '/api/v1/invitations') },
		{
			name: 'POST /api/v1/invitations',
			allowed: ['admin'],
			run: (c) => c.json('POST', '/api/v1/invitations', { email: `x${Math.random().toString(36).slice(2)}@alpha.test`, role: 'viewer' })
		},
		{
			name: 'PATCH /api/v1/members/:id (own role kept)',
			allowed: ['admin'],
			run: async (c) => c.json('PATCH', `/api/v1/members/${await memberIdOf(c)}`, { role: await roleOf(c) })
		}
	];

	for (const cs of cases) {
		for (const role of ['admin', 'engineer', 'technician', 'viewer'] as Role[]) {
			const ok = cs.allowed.includes(role);
			it(`${role}: ${cs.name} → ${ok ? '2xx' : '403'}`, async () => {
				const res = await cs.run(clients[role]);
				if (ok) expect(res.status).toBeLessThan(300);
				else {
					expect(res.status).toBe(403);
					expect(res.headers.get('content-type')).toContain('application/problem+json');
				}
			});
		}
	}

	for (const [path, allowed] of [
		['/settings/members', ['admin', 'engineer', 'technician', 'viewer']],
		['/settings/organisation', ['admin', 'engineer', 'technician', 'viewer']],
		['/settings/outbox', ['admin']]
	] as Array<[string, Role[]]>) {
		for (const role of ['admin', 'engineer', 'technician', 'viewer'] as Role[]) {
			const ok = allowed.includes(role);
			it(`${role}: page ${path} → ${ok ? 200 : 403}`, async () => {
				expect((await clients[role].get(path)).status).toBe(ok ? 200 : 403);
			});
		}
	}

	it('a form action is guarded on the server, not by hiding the button', async () => {
		const res = await clients.technician.form('/settings/members?/invite', { email: 'sneaky@alpha.test', role: 'admin' });
		expect(res.status).toBe(403);
		expect(await t.db.selectFrom('invitation').select('id').where('email', '=', 'sneaky@alpha.test').executeTakeFirst()).toBeUndefined();
	});

	it('not signed in: the API answers 401 problem+json and pages redirect to sign-in', async () => {
		const anon = new Client(app.url);
		const res = await anon.json('GET', '/api/v1/members');
		expect(res.status).toBe(401);
		expect((await res.json()).title).toBe('Not signed in');
		const page = await anon.get('/settings/members');
		expect(page.status).toBe(303);
		expect(page.headers.get('location')).toBe('/sign-in?next=%2Fsettings%2Fmembers');
	});
});

async function memberIdOf(c: Client) {
	const me = await (await c.json('GET', '/api/v1/members')).json();
	const role = await roleOf(c);
	return me.items.find((m: { role: string }) => m.role === role).id as string;
}
async function roleOf(c: Client): Promise<Role> {
	return (Object.entries(clients).find(([, v]) => v === c)![0] as Role) ?? 'viewer';
}

describe('last admin', () => {
	it('the last admin cannot be demoted or removed', async () => {
		const list = await (await clients.admin.json('GET', '/api/v1/members')).json();
		const adminId = list.items.find((m: { role: string }) => m.role === 'admin').id;
		const demote = await clients.admin.json('PATCH', `/api/v1/members/${adminId}`, { role: 'engineer' });
		expect(demote.status).toBe(409);
		expect((await demote.json()).detail).toMatch(/at least one admin/);
		expect((await clients.admin.json('DELETE', `/api/v1/members/${adminId}`)).status).toBe(409);
		const row = await t.db.selectFrom('member').select('role').where('id', '=', adminId).executeTakeFirstOrThrow();
		expect(row.role).toBe('admin');
	});

	it('an admin changes a role and removes a member; the removed member loses access at once', async () => {
		const list = await (await clients.admin.json('GET', '/api/v1/members')).json();
		const viewerId = list.items.find((m: { role: string }) => m.role === 'viewer').id;
		const up = await clients.admin.json('PATCH', `/api/v1/members/${viewerId}`, { role: 'technician' });
		expect(up.status).toBe(200);
		expect((await up.json()).role).toBe('technician');
		expect((await clients.admin.json('PATCH', `/api/v1/members/${viewerId}`, { role: 'viewer' })).status).toBe(200);
		expect((await clients.admin.json('DELETE', `/api/v1/members/${viewerId}`)).status).toBe(204);
		expect((await clients.viewer.json('GET', '/api/v1/members')).status).toBe(401);
	});
});

describe('tenant isolation', () => {
	it("a member of A gets 404 for B's member and invitation, through the API and pages", async () => {
		expect(orgA).not.toBe(orgB);
		const r1 = await clients.admin.json('GET', `/api/v1/members/${bMemberId}`);
		expect(r1.status).toBe(404);
		expect(r1.headers.get('content-type')).toContain('application/problem+json');
		expect((await clients.admin.json('PATCH', `/api/v1/members/${bMemberId}`, { role: 'viewer' })).status).toBe(404);
		expect((await clients.admin.json('DELETE', `/api/v1/members/${bMemberId}`)).status).toBe(404);
		expect((await clients.admin.json('GET', `/api/v1/invitations/${bInvitationId}`)).status).toBe(404);
		expect((await clients.admin.json('DELETE', `/api/v1/invitations/${bInvitationId}`)).status).toBe(404);
		expect((await clients.admin.get(`/settings/members/${bMemberId}`)).status).toBe(404);
		// B's rows are untouched.
		const m = await t.db.selectFrom('member').select('role').where('id', '=', bMemberId).executeTakeFirstOrThrow();
		expect(m.role).toBe('technician');
		const inv = await t.db.selectFrom('invitation').select('revoked_at').where('id', '=', bInvitationId).executeTakeFirstOrThrow();
		expect(inv.revoked_at).toBeNull();
	});

	it("lists show only the member's own organisation", async () => {
		const a = await (await clients.engineer.json('GET', '/api/v1/members')).json();
		expect(a.items.every((m: { email: string }) => m.email.endsWith('@alpha.test'))).toBe(true);
		const b = await (await bAdmin.json('GET', '/api/v1/members')).json();
		expect(b.items.every((m: { email: string }) => m.email.endsWith('@bravo.test'))).toBe(true);
	});

	it('the outbox page shows only mail to the own organisation', async () => {
		await clients.admin.json('POST', '/api/v1/invitations', { email: 'fresh@alpha.test', role: 'viewer' });
		await mail.waitFor('fresh@alpha.test');
		await mail.waitFor('new@bravo.test');
		const html = await (await clients.admin.get('/settings/outbox')).text();
		expect(html).toContain('fresh@alpha.test');
		expect(html).not.toContain('new@bravo.test');
	});
});

describe('bad input', () => {
	it('malformed JSON gives 400 problem+json and writes nothing', async () => {
		const before = await t.db
			.selectFrom('invitation')
			.select((eb) => eb.fn.countAll<string>().as('n'))
			.executeTakeFirstOrThrow();
		const res = await clients.admin.json('POST', '/api/v1/invitations', '{"email": "a@b.test", role', true);
		expect(res.status).toBe(400);
		expect(res.headers.get('content-type')).toContain('application/problem+json');
		const body = await res.json();
		expect(body.status).toBe(400);
		expect(body.detail).toMatch(/not valid JSON/);
		const after = await t.db
			.selectFrom('invitation')
			.select((eb) => eb.fn.countAll<string>().as('n'))
			.executeTakeFirstOrThrow();
		expect(after.n).toBe(before.n);
	});

	it('wrong types give 400 with field errors', async () => {
		const res = await clients.admin.json('POST', '/api/v1/invitations', { email: 42, role: 'overlord' });
		expect(res.status).toBe(400);
		const body = await res.json();
		expect(Object.keys(body.errors).sort()).toEqual(['email', 'role']);
	});

	it('a too-long field gives a field error and nothing is written (API and form)', async () => {
		const long = 'N'.repeat(121);
		const res = await clients.admin.json('PATCH', '/api/v1/organisation', { name: long });
		expect(res.status).toBe(400);
		expect((await res.json()).errors.name[0]).toMatch(/at most 120/);
		const form = await clients.admin.form('/settings/organisation', { name: long });
		expect(form.status).toBe(400);
		const html = await form.text();
		expect(html).toContain('data-field-error="name"');
		expect(html).toContain(long); // what was typed is kept
		const org = await t.db.selectFrom('organisation').select('name').where('id', '=', orgA).executeTakeFirstOrThrow();
		expect(org.name).toBe('Alpha');
	});

	it('a non-JSON content type is refused with 415', async () => {
		const res = await clients.admin.request('/api/v1/invitations', {
			method: 'POST',
			headers: { 'content-type': 'text/plain' },
			body: 'hello'
		});
		expect(res.status).toBe(415);
	});

	it('an unknown API route gives 404 problem+json', async () => {
		const res = await clients.admin.json('GET', '/api/v1/nothing-here');
		expect(res.status).toBe(404);
		expect(res.headers.get('content-type')).toContain('application/problem+json');
	});
});

describe('security headers and health', () => {
	it('pages carry a content security policy and the usual headers', async () => {
		const res = await clients.admin.get('/');
		expect(res.headers.get('content-security-policy')).toMatch(/default-src 'self'/);
		expect(res.headers.get('x-content-type-options')).toBe('nosniff');
		expect(res.headers.get('x-frame-options')).toBe('DENY');
	});

	it('a cross-site form post is refused by the origin check', async () => {
		const res = await clients.admin.request('/settings/organisation', {
			method: 'POST',
			headers: { 'content-type': 'application/x-www-form-urlencoded', origin: 'http://evil.invalid' },
			body: 'name=Hijacked'
		});
		expect(res.status).toBe(403);
	});

	it('/api/health reports the database', async () => {
		const res = await fetch(`${app.url}/api/health`);
		expect(res.status).toBe(200);
		expect((await res.json()).database.status).toBe('up');
	});
});
