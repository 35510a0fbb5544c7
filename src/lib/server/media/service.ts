// Storing an upload: process it fully in memory, write the three objects, then the row. If any
// step fails, what was written is removed again, so a refused or failed upload leaves nothing.
import { randomUUID } from 'node:crypto';
import type { DB } from '../db/index';
import type { MediaKind } from '../db/types';
import type { Storage } from '../storage/index';
import { getMachine } from '../db/machines';
import { RegisterError } from '../db/register';
import { getMedia } from '../db/media';
import { cleanFilename } from './filename';
import { extensionOf, processMedia, type MediaLimits } from './process';

export interface UploadInput {
	organisationId: string;
	machineId: string;
	userId: string | null;
	kind?: MediaKind;
	caption?: string;
	filename: string;
	bytes: Buffer;
}

export async function storeUpload(db: DB, storage: Storage, limits: MediaLimits, input: UploadInput) {
	const machine = await getMachine(db, input.organisationId, input.machineId);
	if (!machine) throw new RegisterError(404, 'No such machine in your organisation.');
	if (machine.archivedAt) throw new RegisterError(409, 'This machine is archived: restore it before adding photos.');

	const processed = await processMedia(input.bytes, limits);
	const id = randomUUID();
	const prefix = `org/${input.organisationId}/machine/${input.machineId}/media/${id}`;
	const keys = {
		original: `${prefix}/original.${processed.extension}`,
		display: `${prefix}/display.${extensionOf(processed.display.mimeType)}`,
		thumb: `${prefix}/thumb.webp`
	};
	const written: string[] = [];
	try {
		await storage.put(keys.original, processed.original, processed.mimeType);
		written.push(keys.original);
		await storage.put(keys.display, processed.display.bytes, processed.display.mimeType);
		written.push(keys.display);
		await storage.put(keys.thumb, processed.thumb.bytes, processed.thumb.mimeType);
		written.push(keys.thumb);
		await db
			.insertInto('media')
			.values({
				id,
				organisation_id: input.organisationId,
				machine_id: input.machineId,
				kind: input.kind ?? (processed.mimeType === 'application/pdf' ? 'drawing' : 'photo'),
				caption: input.caption ?? '',
				original_filename: cleanFilename(input.filename, processed.extension),
				mime_type: processed.mimeType,
				display_mime_type: processed.display.mimeType,
				thumb_mime_type: processed.thumb.mimeType,
				width: processed.display.width,
				height: processed.display.height,
				thumb_width: processed.thumb.width,
				thumb_height: processed.thumb.height,
				original_bytes: processed.original.length,
				display_bytes: processed.display.bytes.length,
				thumb_bytes: processed.thumb.bytes.length,
				original_key: keys.original,
				display_key: keys.display,
				thumb_key: keys.thumb,
				sha256: processed.sha256,
				etag: processed.etag,
				uploaded_by: input.userId
			})
			.execute();
	} catch (e) {
		await Promise.all(written.map((k) => storage.delete(k).catch(() => undefined)));
		throw e;
	}
	return (await getMedia(db, input.organisationId, id))!;
}
