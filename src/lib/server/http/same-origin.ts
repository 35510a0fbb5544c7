// Where to go after sign-in (`?next=`) comes from the address bar, so anyone can write it.

/**
 * A path on our own origin to redirect to, or `fallback`. `next` is resolved against `origin`
 * with the URL parser, exactly as a browser would resolve the Location header, and kept only if
 * it stays on that origin; the result is rebuilt from the parsed URL and is always a plain
 * absolute path. Backslashes, control characters and whitespace are refused outright: browsers
 * read `\` as `/` and drop tabs and newlines, which is how `/\evil.example` or `/<TAB>/evil.example`
 * turn into `//evil.example`.
 */
export function sameOriginPath(next: string | null | undefined, origin: string, fallback = '/'): string {
	if (!next || next.length > 2048) return fallback;
	// eslint-disable-next-line no-control-regex
	if (/[\\\s\u0000-\u001f\u007f-\u009f]/.test(next)) return fallback;
	if (!next.startsWith('/') || next.startsWith('//')) return fallback;
	let base: URL;
	let url: URL;
	try {
		base = new URL(origin);
		url = new URL(next, base);
	} catch {
		return fallback;
	}
	if (url.origin !== base.origin || url.username || url.password) return fallback;
	const path = url.pathname + url.search + url.hash;
	// Dot segments can fold `/.//evil.example` into `//evil.example`; an encoded slash or
	// backslash at the start could be decoded into the same by something downstream.
	if (!path.startsWith('/') || path.startsWith('//')) return fallback;
	let decoded: string;
	try {
		decoded = decodeURIComponent(url.pathname);
	} catch {
		return fallback;
	}
	if (decoded.startsWith('//') || decoded.includes('\\')) return fallback;
	return path;
}
