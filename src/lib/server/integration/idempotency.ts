// Idempotency keys on every POST under /api/v1. The first request with a key is run and its
// answer stored (key, organisation, method and path, a hash of the request, the response); a
// retry with the same key and the same request gets the stored answer again without running
// anything; the same key with a different request is refused with 422. Keys are kept a day.
import { createHash } from 'node:crypto';
import { sql } from 'kysely';
import type { DB } from '../db/index';
import { problem } from '../http/problem';

export const IDEMPOTENCY_HEADER = 'idempotency-key';
const KEY_PATTERN = /^[\x21-\x7e]{1,255}$/;
/** How long a key is remembered. */
export const IDEMPOTENCY_TTL_HOURS = 24;
/** A request still "processing" after this long was lost (its process died): the key may be used again. */
const STALE_PROCESSING_MS = 5 * 60_000;
/** Response headers kept and replayed. */
const KEPT_HEADERS = ['content-type', 'location'];

export function requestHash(method: string, path: string, search: string, contentType: string, body: Uint8Array): string {
	const h = createHash('sha256');
	for (const part of [method, path, search, contentType]) h.update(part).update('\n');
	h.update(body);
	return h.digest('hex');
}

type Begin =
	{ kind: 'run'; finish(response: Response): Promise<Response>; abandon(): Promise<void> } | { kind: 'answer'; response: Response };

/**
 * Before a POST runs: either answer now (a replay, a conflict, a bad key) or run it and then
 * call `finish` with the response (or `abandon` when it threw).
 */
export async function beginIdempotent(
	db: DB,
	organisationId: string,
	key: string,
	request: { method: string; path: string; search: string; contentType: string; body: Uint8Array }
): Promise<Begin> {
	if (!KEY_PATTERN.test(key)) {
		return { kind: 'answer', response: problem(400, 'Idempotency-Key is 1 to 255 printable ASCII characters (a UUID is a good choice).') };
	}
	const hash = requestHash(request.method, request.path, request.search, request.contentType, request.body);
	// Forget old keys now and then (cheap: an index on created_at).
	if (Math.random() < 0.01) {
		await sql`delete from idempotency_record where created_at < now() - make_interval(hours => ${IDEMPOTENCY_TTL_HOURS})`.execute(db);
	}
	const claimed = await sql<{ key: string }>`
		insert into idempotency_record (organisation_id, key, method, path, request_hash, status)
		values (${organisationId}, ${key}, ${request.method}, ${request.path}, ${hash}, 'processing')
		on conflict (organisation_id, key) do update
			set method = excluded.method, path = excluded.path, request_hash = excluded.request_hash, created_at = now(),
				status = 'processing', response_status = null, response_headers = null, response_body = null, completed_at = null
			where idempotency_record.created_at < now() - make_interval(hours => ${IDEMPOTENCY_TTL_HOURS})
			   or (idempotency_record.status = 'processing' and idempotency_record.created_at < now() - make_interval(secs => ${STALE_PROCESSING_MS / 1000}))
		returning key`.execute(db);
	if (claimed.rows.length === 0) {
		const existing = await db
			.selectFrom('idempotency_record')
			.selectAll()
			.where('organisation_id', '=', organisationId)
			.where('key', '=', key)
			.executeTakeFirst();
		if (!existing) return beginIdempotent(db, organisationId, key, request);
		if (existing.request_hash !== hash || existing.method !== request.method || existing.path !== request.path) {
			return {
				kind: 'answer',
				response: problem(
					422,
					`This Idempotency-Key was already used for a different request (${existing.method} ${existing.path} with another body). Use a new key for a new request.`,
					{ title: 'Idempotency-Key reused' }
				)
			};
		}
		if (existing.status === 'processing') {
			return {
				kind: 'answer',
				response: problem(409, 'A request with this Idempotency-Key is still being processed. Try again in a moment.', {
					headers: { 'retry-after': '1' }
				})
			};
		}
		const headers = new Headers((existing.response_headers as Record<string, string> | null) ?? {});
		headers.set('idempotent-replayed', 'true');
		return {
			kind: 'answer',
			response: new Response(existing.response_body ? Buffer.from(existing.response_body) : null, {
				status: existing.response_status ?? 200,
				headers
			})
		};
	}
	const forget = async () => {
		await db.deleteFrom('idempotency_record').where('organisation_id', '=', organisationId).where('key', '=', key).execute();
	};
	return {
		kind: 'run',
		async finish(response) {
			// A server error ran nothing for sure: forget the key so a retry runs again.
			if (response.status >= 500) {
				await forget();
				return response;
			}
			const body = new Uint8Array(await response.clone().arrayBuffer());
			const headers: Record<string, string> = {};
			for (const h of KEPT_HEADERS) {
				const v = response.headers.get(h);
				if (v !== null) headers[h] = v;
			}
			await db
				.updateTable('idempotency_record')
				.set({
					status: 'done',
					response_status: response.status,
					response_headers: JSON.stringify(headers),
					response_body: body,
					completed_at: new Date()
				})
				.where('organisation_id', '=', organisationId)
				.where('key', '=', key)
				.execute();
			return response;
		},
		abandon: forget
	};
}
