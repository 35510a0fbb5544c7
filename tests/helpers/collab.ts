// Fixtures for live-board tests and benchmarks: an organisation with one member per role, a
// site, machines, a survey and boards, written straight to the database; sessions come from
// signing in over HTTP as a browser would.
import * as Y from 'yjs';
import type { DB } from '../../src/lib/server/db/index';
import type { Role } from '../../src/lib/server/db/types';
import { hashPassword } from '../../src/lib/server/auth/password';
import { BoardProvider, type BoardProviderOptions } from '../../src/lib/board/sync/provider';
import { Client } from './http';
import { readBoard } from '../../src/lib/board/model';

export const PASSWORD = 'board sync pass 1';
let passwordHash: Promise<string> | null = null;

export interface Person {
	userId: string;
	email: string;
	name: string;
	role: Role;
}

export interface BoardFixture {
	organisationId: string;
	siteId: string;
	machineIds: string[];
	surveyId: string;
	boardIds: string[];
	people: Record<Role, Person>;
}

let counter = 0;

/** An organisation with admin, engineer, technician and viewer, a survey and `boards` boards. */
export async function createBoardFixture(
	db: DB,
	opts: { name?: string; boards?: number; extraTechnicians?: number } = {}
): Promise<BoardFixture & { technicians: Person[] }> {
	passwordHash ??= hashPassword(PASSWORD);
	const hash = await passwordHash;
	const tag = `${Date.now().toString(36)}${(counter++).toString(36)}`;
	const org = await db
		.insertInto('organisation')
		.values({ name: opts.name ?? `Brookside Pumping ${tag}` })
		.returning('id')
		.executeTakeFirstOrThrow();
	const people = {} as Record<Role, Person>;
	const names: Record<Role, string> = { admin: 'Ada Admin', engineer: 'Esme Engineer', technician: 'Teo Technician', viewer: 'Vic Viewer' };
	const technicians: Person[] = [];
	const make = async (role: Role, name: string, key: string) => {
		const userId = `u-${key}-${tag}`;
		const email = `${key}-${tag}@brookside.test`;
		await db.insertInto('app_user').values({ id: userId, email, name, password_hash: hash }).execute();
		await db.insertInto('member').values({ organisation_id: org.id, user_id: userId, role }).execute();
		return { userId, email, name, role };
	};
	for (const role of ['admin', 'engineer', 'technician', 'viewer'] as Role[]) people[role] = await make(role, names[role], role);
	for (let i = 0; i < (opts.extraTechnicians ?? 0); i++) technicians.push(await make('technician', `Technician ${i + 2}`, `tech${i + 2}`));
	const site = await db
		.insertInto('site')
		.values({ organisation_id: org.id, name: 'Lower Works' })
		.returning('id')
		.executeTakeFirstOrThrow();
	const n = opts.boards ?? 1;
	const machineIds: string[] = [];
	for (let i = 0; i < n; i++) {
		const m = await db
			.insertInto('machine')
			.values({ organisation_id: org.id, site_id: site.id, name: `Raw water pump ${i + 1}`, kind: 'pump', speed_rpm: 1480 })
			.returning('id')
			.executeTakeFirstOrThrow();
		machineIds.push(m.id);
	}
	const survey = await db
		.insertInto('survey')
		.values({ organisation_id: org.id, site_id: site.id, title: 'Pump house walk', status: 'walking', created_by: people.engineer.userId })
		.returning('id')
		.executeTakeFirstOrThrow();
	await db
		.insertInto('survey_machine')
		.values(machineIds.map((machine_id, position) => ({ organisation_id: org.id, survey_id: survey.id, machine_id, position })))
		.execute();
	const boardIds: string[] = [];
	for (const machineId of machineIds) {
		const b = await db
			.insertInto('board')
			.values({ organisation_id: org.id, survey_id: survey.id, machine_id: machineId, title: 'Motor and pump, drive side' })
			.returning('id')
			.executeTakeFirstOrThrow();
		boardIds.push(b.id);
	}
	return { organisationId: org.id, siteId: site.id, machineIds, surveyId: survey.id, boardIds, people, technicians };
}

/** Signs in over HTTP; returns the Cookie header value for a socket. */
export async function sessionCookie(baseUrl: string, person: Pick<Person, 'email'>): Promise<string> {
	const c = new Client(baseUrl);
	await c.signIn(person.email, PASSWORD);
	return `spotface_session=${c.sessionCookie}`;
}

export function openProvider(serverUrl: string, boardId: string, cookie: string | undefined, extra: Partial<BoardProviderOptions> = {}) {
	const doc = extra.doc ?? new Y.Doc();
	return new BoardProvider({ serverUrl, boardId, doc, cookie, offline: false, ...extra });
}

/** Polls until `check` returns a truthy value (retrying assertions instead of sleeping). */
export async function waitFor<T>(check: () => T | Promise<T>, what = 'condition', timeoutMs = 20_000): Promise<T> {
	const start = Date.now();
	let last: unknown;
	for (;;) {
		try {
			const v = await check();
			if (v) return v;
		} catch (e) {
			last = e;
		}
		if (Date.now() - start > timeoutMs) throw new Error(`timed out waiting for ${what}${last ? `: ${(last as Error).message}` : ''}`);
		await new Promise((r) => setTimeout(r, 20));
	}
}

/** Resolves with the next emission of `event`. */
export function next(provider: BoardProvider, event: Parameters<BoardProvider['on']>[0], timeoutMs = 10_000): Promise<unknown[]> {
	return new Promise((resolve, reject) => {
		const timer = setTimeout(() => {
			off();
			reject(new Error(`no '${event}' within ${timeoutMs} ms`));
		}, timeoutMs);
		const off = provider.on(event, (...a: unknown[]) => {
			clearTimeout(timer);
			off();
			resolve(a);
		});
	});
}

/** The content of a board document as plain data, for comparing documents. */
export function content(doc: Y.Doc) {
	const out: Record<string, unknown> = {};
	for (const name of ['points', 'routes', 'zones', 'meta']) out[name] = doc.getMap(name).toJSON();
	return out;
}

/** Rebuilds a document from what is stored: the snapshot (if any) and every log row. */
export async function storedDoc(db: DB, boardId: string, opts: { logOnly?: boolean } = {}) {
	const doc = new Y.Doc();
	const b = await db.selectFrom('board').select(['snapshot']).where('id', '=', boardId).executeTakeFirstOrThrow();
	if (b.snapshot && !opts.logOnly) Y.applyUpdate(doc, b.snapshot);
	const rows = await db.selectFrom('board_update').select(['update']).where('board_id', '=', boardId).orderBy('seq').execute();
	for (const r of rows) Y.applyUpdate(doc, r.update);
	return doc;
}

/** What the server has stored for a board, read through the board model. */
export async function readBoardContent(db: DB, boardId: string) {
	return readBoard(await storedDoc(db, boardId));
}
