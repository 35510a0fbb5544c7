// Serving a stored file: only after the organisation check (the caller does it), with an ETag so
// a tablet on a weak connection revalidates instead of downloading again. The display image and
// thumbnail (made by us, no metadata) are shown inline; the original, as uploaded, is only ever a
// download. Every response says nosniff, so a browser never guesses a type from the bytes.
import type { Media } from '../db/types';
import { problem } from '../http/problem';
import type { Storage } from '../storage/index';
import { dispositionHeader, downloadName } from './filename';
import { extensionOf } from './process';

export type MediaFile = 'display' | 'thumb' | 'original';

const SUFFIX: Record<MediaFile, string> = { display: 'd', thumb: 't', original: 'o' };

export async function serveVariant(storage: Storage, m: Media, variant: MediaFile, request: Request): Promise<Response> {
	const etag = `"${m.etag}-${SUFFIX[variant]}"`;
	const headers: Record<string, string> = {
		etag,
		// Private: the route checks the session. Immutable: a media id's files never change.
		'cache-control': 'private, max-age=31536000, immutable',
		'x-content-type-options': 'nosniff',
		'cross-origin-resource-policy': 'same-origin'
	};
	if (variant === 'original') {
		// Should the download be opened in a tab after all, it runs nothing and loads nothing.
		headers['content-security-policy'] = "default-src 'none'; frame-ancestors 'none'; sandbox";
	}
	const match = request.headers.get('if-none-match');
	if (match && match.split(',').some((t) => t.trim().replace(/^W\//, '') === etag)) {
		return new Response(null, { status: 304, headers });
	}
	const key = variant === 'display' ? m.display_key : variant === 'thumb' ? m.thumb_key : m.original_key;
	const bytes = await storage.get(key);
	if (!bytes) return problem(404, 'The file is missing from storage. Upload it again.');
	const type = variant === 'display' ? m.display_mime_type : variant === 'thumb' ? m.thumb_mime_type : m.mime_type;
	const ext = extensionOf(type);
	const disposition =
		variant === 'original'
			? dispositionHeader('attachment', downloadName(m.original_filename, m.mime_type, extensionOf(m.mime_type)))
			: dispositionHeader('inline', `${m.original_filename.replace(/\.[^.]*$/, '').slice(0, 80)}-${variant}.${ext}`);
	return new Response(new Uint8Array(bytes), {
		status: 200,
		headers: { ...headers, 'content-type': type, 'content-length': String(bytes.length), 'content-disposition': disposition }
	});
}
