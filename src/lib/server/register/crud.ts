// One shape for the register's JSON routes: list with pagination, get, create, update, archive.
// Archive is DELETE: the row stays and remains readable by id (surveys refer to it).
import type { RequestEvent, RequestHandler } from '@sveltejs/kit';
import type { z } from 'zod';
import { requireApi } from '../auth/require';
import type { Action } from '../auth/guard';
import type { Viewer } from '../auth/lucia';
import { context } from '../context';
import type { DB } from '../db/index';
import { json, readJson } from '../http/problem';
import { audit, errorResponse, isUuid, notFound, NOUN } from './api';

type Noun = keyof typeof NOUN;

export function collection<S extends z.ZodType, T extends { id: string }>(o: {
	noun: Noun;
	read: Action;
	write: Action;
	list: (db: DB, v: Viewer, url: URL) => Promise<unknown>;
	schema: S;
	create: (db: DB, v: Viewer, data: z.infer<S>, event: RequestEvent) => Promise<T>;
}): { GET: RequestHandler; POST: RequestHandler } {
	return {
		GET: async ({ locals, url }) => {
			const v = requireApi(locals, o.read);
			if (v instanceof Response) return v;
			return json(await o.list(context().handle.db, v, url));
		},
		POST: async (event) => {
			const v = requireApi(event.locals, o.write);
			if (v instanceof Response) return v;
			const body = await readJson(event.request, o.schema);
			if (!body.ok) return body.response;
			const db = context().handle.db;
			try {
				const row = await o.create(db, v, body.data, event);
				await audit(db, v, `${o.noun}.created`, o.noun, row.id);
				return json(row, { status: 201, headers: { location: `${event.url.pathname}/${row.id}` } });
			} catch (e) {
				return errorResponse(e);
			}
		}
	};
}

export function item<S extends z.ZodType, T>(o: {
	noun: Noun;
	read: Action;
	write: Action;
	get: (db: DB, organisationId: string, id: string) => Promise<T | null>;
	schema: S;
	update: (db: DB, organisationId: string, id: string, data: z.infer<S>) => Promise<T | null>;
	archive: (db: DB, organisationId: string, id: string) => Promise<T | null>;
}): { GET: RequestHandler; PATCH: RequestHandler; DELETE: RequestHandler } {
	return {
		GET: async ({ locals, params }) => {
			const v = requireApi(locals, o.read);
			if (v instanceof Response) return v;
			const row = isUuid(params.id) ? await o.get(context().handle.db, v.organisationId, params.id) : null;
			return row ? json(row) : notFound(o.noun);
		},
		PATCH: async ({ locals, params, request }) => {
			const v = requireApi(locals, o.write);
			if (v instanceof Response) return v;
			if (!isUuid(params.id)) return notFound(o.noun);
			const body = await readJson(request, o.schema);
			if (!body.ok) return body.response;
			const db = context().handle.db;
			try {
				const row = await o.update(db, v.organisationId, params.id, body.data);
				if (!row) return notFound(o.noun);
				await audit(db, v, `${o.noun}.updated`, o.noun, params.id, { fields: Object.keys(body.data as object) });
				return json(row);
			} catch (e) {
				return errorResponse(e);
			}
		},
		DELETE: async ({ locals, params }) => {
			const v = requireApi(locals, o.write);
			if (v instanceof Response) return v;
			if (!isUuid(params.id)) return notFound(o.noun);
			const db = context().handle.db;
			const row = await o.archive(db, v.organisationId, params.id);
			if (!row) return notFound(o.noun);
			await audit(db, v, `${o.noun}.archived`, o.noun, params.id);
			return json(row);
		}
	};
}
