// Media rows (photos and drawings of a machine). The bytes live in Storage; rows keep the keys.
import { sql } from 'kysely';
import type { DB } from './index';
import type { Media, MediaKind } from './types';
import { pageOf, whereArchived, type Archived } from './register';

const iso = (d: Date | string | null) => (d == null ? null : new Date(d).toISOString());

export function mediaDto(m: Media & { uploaded_by_name?: string | null }) {
	return {
		id: m.id,
		machineId: m.machine_id,
		kind: m.kind,
		caption: m.caption,
		originalFilename: m.original_filename,
		mimeType: m.mime_type,
		width: m.width,
		height: m.height,
		thumbWidth: m.thumb_width,
		thumbHeight: m.thumb_height,
		originalBytes: m.original_bytes,
		displayBytes: m.display_bytes,
		sha256: m.sha256,
		uploadedBy: m.uploaded_by,
		...(m.uploaded_by_name !== undefined ? { uploadedByName: m.uploaded_by_name } : {}),
		displayUrl: `/api/v1/media/${m.id}/display`,
		thumbUrl: `/api/v1/media/${m.id}/thumb`,
		originalUrl: `/api/v1/media/${m.id}/original`,
		archivedAt: iso(m.archived_at),
		createdAt: iso(m.created_at)!,
		updatedAt: iso(m.updated_at)!
	};
}
export type MediaDto = ReturnType<typeof mediaDto>;

function base(db: DB, organisationId: string) {
	return db
		.selectFrom('media')
		.leftJoin('app_user', 'app_user.id', 'media.uploaded_by')
		.where('media.organisation_id', '=', organisationId);
}

export async function listMedia(
	db: DB,
	organisationId: string,
	machineId: string,
	opts: { archived?: Archived; kind?: MediaKind; page?: number; perPage?: number } = {}
) {
	const page = opts.page ?? 1;
	const perPage = opts.perPage ?? 50;
	let q = base(db, organisationId).where('media.machine_id', '=', machineId);
	q = whereArchived(q, 'media.archived_at', opts.archived ?? 'live');
	if (opts.kind) q = q.where('media.kind', '=', opts.kind);
	const [rows, count] = await Promise.all([
		q
			.selectAll('media')
			.select('app_user.name as uploaded_by_name')
			.orderBy('media.created_at', 'desc')
			.orderBy('media.id')
			.limit(perPage)
			.offset((page - 1) * perPage)
			.execute(),
		q.select((eb) => eb.fn.countAll<string>().as('n')).executeTakeFirstOrThrow()
	]);
	return pageOf(rows.map(mediaDto), Number(count.n), page, perPage);
}

/** The full row (with storage keys) for serving; null for another organisation's id. */
export function getMediaRow(db: DB, organisationId: string, id: string) {
	return base(db, organisationId)
		.selectAll('media')
		.select('app_user.name as uploaded_by_name')
		.where('media.id', '=', id)
		.executeTakeFirst();
}

export async function getMedia(db: DB, organisationId: string, id: string) {
	const m = await getMediaRow(db, organisationId, id);
	return m ? mediaDto(m) : null;
}

export async function updateMedia(db: DB, organisationId: string, id: string, input: { caption?: string; kind?: MediaKind }) {
	const set: { caption?: string; kind?: MediaKind } = {};
	if (input.caption !== undefined) set.caption = input.caption;
	if (input.kind !== undefined) set.kind = input.kind;
	const r = await db
		.updateTable('media')
		.set({ ...set, updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return r ? getMedia(db, organisationId, id) : null;
}

export async function archiveMedia(db: DB, organisationId: string, id: string) {
	const r = await db
		.updateTable('media')
		.set({ archived_at: sql<Date>`coalesce(archived_at, now())`, updated_at: sql<Date>`now()` })
		.where('organisation_id', '=', organisationId)
		.where('id', '=', id)
		.returning('id')
		.executeTakeFirst();
	return r ? getMedia(db, organisationId, id) : null;
}
