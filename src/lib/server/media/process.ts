// Turns an uploaded photo or drawing into what Spotface stores and serves: the type is read
// from the bytes (never trusted from the name or the header), size and pixel count are
// limited before anything is decoded, the picture is turned upright from its EXIF
// orientation, and the served images carry no metadata (no GPS position, no camera serial).
import sharp, { type Metadata, type SharpOptions } from 'sharp';
import { createHash } from 'node:crypto';

export interface MediaLimits {
	/** largest accepted upload in bytes */
	maxBytes: number;
	/** largest accepted picture in pixels (width × height), against decompression bombs */
	maxPixels: number;
	/**
	 * Pixel budget for drawing the first page of a PDF (width × height of the rendered page;
	 * the smaller of this and maxPixels applies). The page is scaled down to fit, never refused.
	 */
	pdfRenderMaxPixels: number;
	/** long edge of the display image */
	displayMaxEdge: number;
	/** long edge of the thumbnail */
	thumbMaxEdge: number;
}

export const DEFAULT_LIMITS: MediaLimits = {
	maxBytes: 25 * 1024 * 1024,
	// 100 megapixels: above any tablet or phone camera in use; a bigger "photo" is refused.
	maxPixels: 100_000_000,
	// An ISO A-series sheet (1 : √2) at the 4096 px display edge is 4096 × 2896 = 11.9 MP, so every
	// A-series drawing keeps the full display size; a squarer or bigger page is drawn smaller. The
	// rendered page is held 4 bytes a pixel inside PDFium and again in sharp, so the budget bounds
	// the memory a PDF can take (a 200 × 200 in page is drawn at 3464 × 3464, not 4096 × 4096).
	pdfRenderMaxPixels: 12_000_000,
	displayMaxEdge: 4096,
	thumbMaxEdge: 480
};

export type StoredType = 'image/jpeg' | 'image/png' | 'image/webp' | 'application/pdf';

export class MediaError extends Error {
	constructor(
		readonly status: 413 | 415 | 422,
		message: string
	) {
		super(message);
	}
}

export interface Variant {
	bytes: Buffer;
	mimeType: string;
	width: number;
	height: number;
}

export interface ProcessedMedia {
	mimeType: StoredType;
	extension: string;
	original: Buffer;
	display: Variant;
	thumb: Variant;
	sha256: string;
	etag: string;
}

const EXT: Record<StoredType, string> = { 'image/jpeg': 'jpg', 'image/png': 'png', 'image/webp': 'webp', 'application/pdf': 'pdf' };
export const extensionOf = (t: string) => EXT[t as StoredType] ?? 'bin';

const ACCEPTED = 'Spotface accepts JPEG, PNG and WebP photos and PDF drawings.';

/** The file's real type from its first bytes, or null when it is none we accept. */
export function sniff(b: Uint8Array): StoredType | null {
	if (b.length >= 3 && b[0] === 0xff && b[1] === 0xd8 && b[2] === 0xff) return 'image/jpeg';
	if (b.length >= 8 && [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a].every((v, i) => b[i] === v)) return 'image/png';
	if (b.length >= 12 && ascii(b, 0, 4) === 'RIFF' && ascii(b, 8, 12) === 'WEBP') return 'image/webp';
	if (b.length >= 5 && ascii(b, 0, 5) === '%PDF-') return 'application/pdf';
	return null;
}

function ascii(b: Uint8Array, from: number, to: number) {
	return Buffer.from(b.subarray(from, to)).toString('latin1');
}

/** A plain-words name for a file we refuse, for the error message. */
export function describe(b: Uint8Array): string | null {
	const head = Buffer.from(b.subarray(0, 512))
		.toString('utf8')
		.replace(/^\uFEFF/, '')
		.trimStart()
		.toLowerCase();
	if (head.startsWith('<')) {
		if (head.includes('<svg')) return 'an SVG drawing (vector images can carry scripts)';
		if (head.includes('<html') || head.startsWith('<!doctype html')) return 'an HTML page';
		return 'an XML or text file';
	}
	if (ascii(b, 0, 4) === 'GIF8') return 'a GIF image';
	if (ascii(b, 4, 8) === 'ftyp')
		return /hei[cf]|mif1|msf1/.test(ascii(b, 8, 12))
			? 'a HEIC/HEIF photo (set the camera to save JPEG, "most compatible")'
			: 'a video or HEIF file';
	if (ascii(b, 0, 2) === 'BM') return 'a BMP image';
	if (ascii(b, 0, 4) === 'II*\u0000' || ascii(b, 0, 4) === 'MM\u0000*') return 'a TIFF image';
	if (ascii(b, 0, 4) === 'PK\u0003\u0004') return 'a ZIP or office document';
	if (b.length === 0) return 'an empty file';
	return null;
}

const mb = (n: number) => `${(n / 1024 / 1024).toFixed(n < 10 * 1024 * 1024 ? 1 : 0)} MB`;

function tooManyPixels(w: number, h: number, limits: MediaLimits): MediaError {
	return new MediaError(
		422,
		`The picture is ${w} × ${h} pixels (${((w * h) / 1e6).toFixed(0)} megapixels); the limit is ${(limits.maxPixels / 1e6).toFixed(0)} megapixels. Export it smaller and upload again.`
	);
}

export async function processMedia(bytes: Buffer, limits: MediaLimits = DEFAULT_LIMITS): Promise<ProcessedMedia> {
	if (bytes.length === 0) throw new MediaError(422, 'The file is empty.');
	if (bytes.length > limits.maxBytes) throw new MediaError(413, `The file is ${mb(bytes.length)}; the limit is ${mb(limits.maxBytes)}.`);
	const type = sniff(bytes);
	if (!type) {
		const kind = describe(bytes);
		throw new MediaError(415, `${kind ? `This file is ${kind}.` : 'Spotface cannot tell what kind of file this is.'} ${ACCEPTED}`);
	}

	let source: Buffer;
	let sourceOptions: SharpOptions;
	if (type === 'application/pdf') {
		const page = await renderFirstPage(bytes, limits);
		source = page.data;
		sourceOptions = { raw: { width: page.width, height: page.height, channels: 4 } };
	} else {
		let meta: Metadata;
		try {
			// Reads the header only; a bomb is refused before a single pixel is decoded.
			meta = await sharp(bytes, { failOn: 'none', limitInputPixels: false }).metadata();
		} catch {
			throw new MediaError(422, `The ${label(type)} file is damaged: its header cannot be read.`);
		}
		const expected = type === 'image/jpeg' ? 'jpeg' : type === 'image/png' ? 'png' : 'webp';
		if (meta.format !== expected) throw new MediaError(422, `The file starts like a ${label(type)} but is not one.`);
		const w = meta.width ?? 0;
		const h = meta.height ?? 0;
		if (!w || !h) throw new MediaError(422, `The ${label(type)} file has no picture size.`);
		if (w * h > limits.maxPixels) throw tooManyPixels(w, h, limits);
		source = bytes;
		sourceOptions = { failOn: 'error', limitInputPixels: limits.maxPixels };
	}

	const displayFormat: 'jpeg' | 'png' | 'webp' = type === 'image/jpeg' ? 'jpeg' : type === 'image/webp' ? 'webp' : 'png';
	let display: Variant;
	let thumb: Variant;
	try {
		// autoOrient applies the EXIF orientation; no withMetadata/keepExif, so the output has
		// no EXIF, GPS, XMP or IPTC blocks. One sharp instance per output, not clone(): clone
		// copies the input buffer (structuredClone of the options), a full-size copy each time.
		const open = () => {
			const pipe = sharp(source, sourceOptions).autoOrient();
			// A rendered PDF page is opaque (PDFium paints it white first): drop the alpha channel
			// inside the pipeline rather than in another full-size copy of the page.
			return type === 'application/pdf' ? pipe.removeAlpha() : pipe;
		};
		const displayPipe = open().resize({
			width: limits.displayMaxEdge,
			height: limits.displayMaxEdge,
			fit: 'inside',
			withoutEnlargement: true
		});
		if (displayFormat === 'jpeg') displayPipe.jpeg({ quality: 86, chromaSubsampling: '4:2:0' });
		else if (displayFormat === 'webp') displayPipe.webp({ quality: 86 });
		else displayPipe.png({ compressionLevel: 8 });
		const thumbPipe = open()
			.resize({ width: limits.thumbMaxEdge, height: limits.thumbMaxEdge, fit: 'inside', withoutEnlargement: true })
			.flatten({ background: '#ffffff' })
			.webp({ quality: 78 });
		const [d, t] = await Promise.all([displayPipe.toBuffer({ resolveWithObject: true }), thumbPipe.toBuffer({ resolveWithObject: true })]);
		display = { bytes: d.data, mimeType: `image/${displayFormat}`, width: d.info.width, height: d.info.height };
		thumb = { bytes: t.data, mimeType: 'image/webp', width: t.info.width, height: t.info.height };
	} catch (e) {
		const msg = (e as Error).message ?? '';
		if (/pixel limit/i.test(msg)) throw new MediaError(422, `The picture has more than ${(limits.maxPixels / 1e6).toFixed(0)} megapixels.`);
		throw new MediaError(422, `The ${label(type)} file is damaged or incomplete (was the upload cut short?). Take or export it again.`);
	}
	const sha256 = createHash('sha256').update(bytes).digest('hex');
	const etag = createHash('sha256').update(display.bytes).digest('hex').slice(0, 32);
	return { mimeType: type, extension: EXT[type], original: bytes, display, thumb, sha256, etag };
}

function label(t: StoredType) {
	return t === 'image/jpeg' ? 'JPEG' : t === 'image/png' ? 'PNG' : t === 'image/webp' ? 'WebP' : 'PDF';
}

// --- PDF drawings: first page to an image with PDFium (WebAssembly, shipped in the package) ---

type PdfiumLibrary = Awaited<ReturnType<(typeof import('@hyzyla/pdfium'))['PDFiumLibrary']['init']>>;
let pdfium: Promise<PdfiumLibrary> | null = null;
// PDFium is not re-entrant: one rendering at a time.
let pdfQueue: Promise<unknown> = Promise.resolve();

async function library() {
	pdfium ??= import('@hyzyla/pdfium').then((m) => m.PDFiumLibrary.init());
	return pdfium;
}

/** Points to pixels: about 200 dpi (1 pt = 1/72 in), no more than the display image holds. */
const PDF_DPI = 200;

/**
 * The pixel size to draw a PDF page of w × h points at: about 200 dpi, the long edge at most the
 * display edge, and width × height within the PDF budget (and the picture limit). A huge page is
 * drawn smaller, never refused for its size.
 */
export function pdfRenderSize(w: number, h: number, limits: MediaLimits): { width: number; height: number } {
	if (!(Number.isFinite(w) && Number.isFinite(h) && w > 0 && h > 0)) throw new MediaError(422, 'The first page of the PDF has no size.');
	const budget = Math.min(limits.maxPixels, limits.pdfRenderMaxPixels);
	const scale = Math.min(PDF_DPI / 72, limits.displayMaxEdge / Math.max(w, h), Math.sqrt(budget / (w * h)));
	// Rounding down keeps width × height within the budget.
	return { width: Math.max(1, Math.floor(w * scale)), height: Math.max(1, Math.floor(h * scale)) };
}

async function renderFirstPage(bytes: Buffer, limits: MediaLimits): Promise<{ data: Buffer; width: number; height: number }> {
	const run = pdfQueue.then(async () => {
		const lib = await library();
		let doc;
		try {
			doc = await lib.loadDocument(bytes);
		} catch {
			throw new MediaError(422, 'The PDF cannot be read: it is damaged or protected with a password. Save it again without a password.');
		}
		try {
			if (doc.getPageCount() < 1) throw new MediaError(422, 'The PDF has no pages.');
			const page = doc.getPage(0);
			const { originalWidth, originalHeight } = page.getOriginalSize();
			const { width, height } = pdfRenderSize(originalWidth, originalHeight, limits);
			// width/height with scale 1 draw the page into exactly width × height pixels, RGBA on an
			// opaque white background (transparent: false).
			const img = await page.render({ width, height, scale: 1, render: 'bitmap', transparent: false });
			if (img.width !== width || img.height !== height || img.data.length !== width * height * 4) throw new Error('unexpected bitmap size');
			// The bitmap is already a copy out of PDFium's memory: wrap it, do not copy it again.
			return { data: Buffer.from(img.data.buffer, img.data.byteOffset, img.data.byteLength), width, height };
		} catch (e) {
			if (e instanceof MediaError) throw e;
			throw new MediaError(422, 'The first page of the PDF could not be drawn. Export the drawing as PNG or JPEG and upload that.');
		} finally {
			doc.destroy();
		}
	});
	pdfQueue = run.catch(() => undefined);
	return run;
}
