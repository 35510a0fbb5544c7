// Serving a stored image: only after the organisation check (the caller does it), with an
// ETag so a tablet on a weak connection revalidates instead of downloading again.
import type { Media } from '../db/types';
import { problem } from '../http/problem';
import type { Storage } from '../storage/index';

export async function serveVariant(storage: Storage, m: Media, variant: 'display' | 'thumb', request: Request): Promise<Response> {
	const etag = `"${m.etag}-${variant === 'display' ? 'd' : 't'}"`;
	const headers: Record<string, string> = {
		etag,
		// Private: the route checks the session. Immutable: a media id's images never change.
		'cache-control': 'private, max-age=31536000, immutable',
		'x-content-type-options': 'nosniff',
		'cross-origin-resource-policy': 'same-origin'
	};
	const match = request.headers.get('if-none-match');
	if (match && match.split(',').some((t) => t.trim().replace(/^W\//, '') === etag)) {
		return new Response(null, { status: 304, headers });
	}
	const key = variant === 'display' ? m.display_key : m.thumb_key;
	const bytes = await storage.get(key);
	if (!bytes) return problem(404, 'The image file is missing from storage. Upload it again.');
	const type = variant === 'display' ? m.display_mime_type : m.thumb_mime_type;
	const ext = type.split('/')[1] ?? 'bin';
	const name = m.original_filename.replace(/\.[^.]*$/, '').replace(/[^\w.-]+/g, '_').slice(0, 80) || 'image';
	return new Response(new Uint8Array(bytes), {
		status: 200,
		headers: {
			...headers,
			'content-type': type,
			'content-length': String(bytes.length),
			'content-disposition': `inline; filename="${name}-${variant}.${ext === 'jpeg' ? 'jpg' : ext}"`
		}
	});
}
