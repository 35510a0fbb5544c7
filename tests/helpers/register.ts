// Organisations with one member per role, signed-in clients, and register rows made through the API.
import { expect } from 'vitest';
import { hashPassword } from '../../src/lib/server/auth/password';
import type { Role } from '../../src/lib/server/db/types';
import type { TestDatabase } from './db';
import { Client } from './http';

export const PW = 'register test pass 1';

export async function makeOrg(
	t: TestDatabase,
	appUrl: string,
	name: string,
	roles: Role[] = ['admin', 'engineer', 'technician', 'viewer']
) {
	const org = await t.db.insertInto('organisation').values({ name }).returning('id').executeTakeFirstOrThrow();
	const hash = await hashPassword(PW);
	const clients = {} as Record<Role, Client>;
	const userIds = {} as Record<Role, string>;
	const slug = name.toLowerCase().replace(/[^a-z]+/g, '');
	for (const role of roles) {
		const id = `${slug}-${role}`;
		await t.db
			.insertInto('app_user')
			.values({ id, email: `${role}@${slug}.test`, name: `${name} ${role}`, password_hash: hash })
			.execute();
		await t.db.insertInto('member').values({ organisation_id: org.id, user_id: id, role }).execute();
		const c = new Client(appUrl);
		await c.signIn(`${role}@${slug}.test`, PW);
		clients[role] = c;
		userIds[role] = id;
	}
	return { id: org.id, clients, userIds };
}

export async function created<T = Record<string, unknown>>(res: Response | Promise<Response>): Promise<T & { id: string }> {
	const r = await res;
	const body = await r.json();
	expect(r.status, JSON.stringify(body)).toBe(201);
	return body;
}

/** A site with one area and a machine, made by an admin through the API. */
export async function siteWithMachine(c: Client, suffix = '') {
	const site = await created(c.json('POST', '/api/v1/sites', { name: `Test works${suffix}` }));
	const area = await created(c.json('POST', '/api/v1/areas', { siteId: site.id, name: 'Pump hall' }));
	const machine = await created(
		c.json('POST', '/api/v1/machines', {
			siteId: site.id,
			areaId: area.id,
			name: `Raw water pump${suffix}`,
			tag: `P-1${suffix}`,
			kind: 'pump',
			speedRpm: 1480,
			powerKw: 45,
			foundation: 'rigid'
		})
	);
	return { site, area, machine };
}
