// File names as people's devices send them: shown in the app, offered again on download. A name
// is only a label (storage keys are generated), but it must not mislead: bidi controls can make
// "invoice‮gpj.exe" read as "invoiceexe.jpg", zero-width characters make two names look alike.
import contentDisposition from 'content-disposition';

/** The longest stored name, in characters (code points); the extension is kept when cutting. */
export const MAX_FILENAME_LENGTH = 120;

// Unicode "other" characters and separators: controls (Cc: C0, DEL, C1), format characters (Cf:
// the bidi embeddings, overrides and isolates U+202A–U+202E and U+2066–U+2069, the marks U+200E,
// U+200F and U+061C, zero-width U+200B–U+200D, U+FEFF, soft hyphen), lone surrogates (Cs) and the
// line and paragraph separators (Zl, Zp).
const INVISIBLE = /[\p{Cc}\p{Cf}\p{Cs}\p{Zl}\p{Zp}]/gu;
// Whitespace controls become a space rather than gluing two words together.
const SPACING = /[\t\n\v\f\r\u0085\u2028\u2029\p{Zs}]/gu;

function splitExtension(name: string): [string, string] {
	const m = /^(.+?)(\.[\p{L}\p{N}]{1,10})$/u.exec(name);
	return m ? [m[1]!, m[2]!] : [name, ''];
}

/**
 * The name to store for an upload: last path segment only, NFC, no control, bidi or zero-width
 * characters, no quotes or angle brackets, at most MAX_FILENAME_LENGTH characters, never empty
 * (`upload.<ext>` when nothing is left).
 */
export function cleanFilename(name: string, extension?: string): string {
	const base =
		String(name ?? '')
			.split(/[\\/]/)
			.pop() ?? '';
	let clean = base
		.normalize('NFC')
		.replace(SPACING, ' ')
		.replace(INVISIBLE, '')
		.replace(/["<>]/g, '')
		.replace(/ {2,}/g, ' ')
		// No leading dots (a hidden file once downloaded), no trailing dots or spaces (Windows drops them).
		.replace(/^[\s.]+|[\s.]+$/g, '');
	const chars = [...clean];
	if (chars.length > MAX_FILENAME_LENGTH) {
		const [stem, ext] = splitExtension(clean);
		clean =
			[...stem]
				.slice(0, MAX_FILENAME_LENGTH - [...ext].length)
				.join('')
				.trimEnd() + ext;
	}
	if (!/[\p{L}\p{N}]/u.test(clean)) return extension ? `upload.${extension}` : 'upload';
	return clean;
}

const SAME_TYPE: Record<string, string[]> = {
	'image/jpeg': ['jpg', 'jpeg', 'jpe'],
	'image/png': ['png'],
	'image/webp': ['webp'],
	'application/pdf': ['pdf']
};

/**
 * The name to download a stored file under: the cleaned name with the extension of the file's
 * real type, so a PDF sent as "plan.html" comes back as "plan.html.pdf" and never opens as a page.
 */
export function downloadName(stored: string, mimeType: string, extension: string): string {
	const name = cleanFilename(stored, extension);
	const [, ext] = splitExtension(name);
	const known = SAME_TYPE[mimeType] ?? [extension];
	if (ext && known.includes(ext.slice(1).toLowerCase())) return name;
	return cleanFilename(`${name}.${extension}`, extension);
}

/** The name in plain ASCII for old clients, beside the full name in filename* (RFC 6266, RFC 8187). */
function asciiFallback(name: string): string {
	const ascii = name
		.normalize('NFKD')
		.replace(/\p{M}/gu, '')
		.replace(/[^\x20-\x7e]/g, '_')
		// Some clients decode %XX and treat backslashes as escapes inside filename="...".
		.replace(/["\\%]/g, '_');
	return ascii || 'download';
}

/** Content-Disposition for a stored file: `attachment` (or `inline`) with a safe filename and filename*. */
export function dispositionHeader(type: 'attachment' | 'inline', name: string): string {
	const clean = cleanFilename(name);
	return contentDisposition(clean, { type, fallback: asciiFallback(clean) });
}
