import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { DEFAULT_LIMITS, MediaError, processMedia, sniff } from '../../../src/lib/server/media/process';
import {
	hasGpsIfd,
	HTML_FILE,
	SVG_FILE,
	jpeg,
	pdfDrawing,
	pixel,
	png,
	pngHeaderClaiming,
	sidewaysJpegWithGps,
	webp
} from '../../helpers/images';

async function refused(bytes: Buffer, limits = DEFAULT_LIMITS) {
	try {
		await processMedia(bytes, limits);
	} catch (e) {
		expect(e).toBeInstanceOf(MediaError);
		return e as MediaError;
	}
	throw new Error('expected the file to be refused');
}

describe('media processing', () => {
	it('reads the type from the bytes', async () => {
		expect(sniff(await jpeg())).toBe('image/jpeg');
		expect(sniff(await png())).toBe('image/png');
		expect(sniff(await webp())).toBe('image/webp');
		expect(sniff(pdfDrawing())).toBe('application/pdf');
		expect(sniff(SVG_FILE)).toBeNull();
		expect(sniff(HTML_FILE)).toBeNull();
	});

	it('keeps JPEG, PNG and WebP in their format, with a WebP thumbnail', async () => {
		for (const [make, mime] of [
			[jpeg, 'image/jpeg'],
			[png, 'image/png'],
			[webp, 'image/webp']
		] as const) {
			const r = await processMedia(await make(800, 600));
			expect(r.mimeType).toBe(mime);
			expect(r.display.mimeType).toBe(mime);
			expect([r.display.width, r.display.height]).toEqual([800, 600]);
			expect(r.thumb.mimeType).toBe('image/webp');
			expect(Math.max(r.thumb.width, r.thumb.height)).toBe(DEFAULT_LIMITS.thumbMaxEdge);
			expect((await sharp(r.thumb.bytes).metadata()).format).toBe('webp');
		}
	});

	it('limits the display image to a 4096 px long edge', async () => {
		const r = await processMedia(await jpeg(5000, 2500));
		expect([r.display.width, r.display.height]).toEqual([4096, 2048]);
	});

	it('turns an EXIF orientation 6 photo upright and strips GPS and all EXIF', async () => {
		const input = await sidewaysJpegWithGps(600, 400);
		const inMeta = await sharp(input).metadata();
		expect(inMeta.orientation).toBe(6);
		expect(hasGpsIfd(inMeta.exif)).toBe(true);
		expect(inMeta.exif!.includes(Buffer.from('Test camera'))).toBe(true);
		const r = await processMedia(input);
		// Stored 600 × 400 with "rotate 90° clockwise": upright it is 400 wide, 600 high.
		expect([r.display.width, r.display.height]).toEqual([400, 600]);
		const meta = await sharp(r.display.bytes).metadata();
		expect(meta.orientation).toBeUndefined();
		expect(meta.exif).toBeUndefined();
		// The red marker stored top-left is top-right once turned clockwise.
		const [rr, gg] = await pixel(r.display.bytes, 390, 10);
		expect(rr).toBeGreaterThan(200);
		expect(gg).toBeLessThan(60);
		const [lr] = await pixel(r.display.bytes, 10, 10);
		expect(lr).toBeLessThan(240);
	});

	it('refuses a truncated JPEG', async () => {
		const full = await jpeg(1200, 900);
		const e = await refused(full.subarray(0, Math.floor(full.length / 2)));
		expect(e.status).toBe(422);
		expect(e.message).toMatch(/damaged or incomplete/);
	});

	it('refuses SVG and HTML by their content, whatever the name', async () => {
		expect((await refused(SVG_FILE)).message).toMatch(/SVG/);
		const e = await refused(HTML_FILE);
		expect(e.status).toBe(415);
		expect(e.message).toMatch(/HTML page/);
	});

	it('refuses a picture over the pixel limit before decoding it', async () => {
		const bomb = pngHeaderClaiming(60000, 60000);
		const e = await refused(bomb);
		expect(e.message).toMatch(/60000 × 60000 pixels/);
		const small = { ...DEFAULT_LIMITS, maxPixels: 1_000_000 };
		expect((await refused(await png(1200, 1000), small)).message).toMatch(/limit is 1 megapixels/);
	});

	it('refuses a file over the size limit', async () => {
		const e = await refused(await jpeg(400, 300), { ...DEFAULT_LIMITS, maxBytes: 1000 });
		expect(e.status).toBe(413);
	});

	it('turns the first page of a PDF drawing into a PNG', async () => {
		const r = await processMedia(pdfDrawing());
		expect(r.mimeType).toBe('application/pdf');
		expect(r.display.mimeType).toBe('image/png');
		// A4 landscape (842 × 595 pt) at 200 dpi.
		expect(r.display.width).toBe(Math.floor((842 * 200) / 72));
		expect(r.display.width).toBeGreaterThan(r.display.height);
		// The filled rectangle (0.1, 0.2, 0.6) sits 100–400 pt right, 100–300 pt up from the bottom.
		const s = 200 / 72;
		const [red, , blue] = await pixel(r.display.bytes, Math.round(250 * s), Math.round((595 - 200) * s));
		expect(blue).toBeGreaterThan(120);
		expect(red).toBeLessThan(60);
	});

	it('refuses a damaged PDF', async () => {
		const e = await refused(Buffer.from('%PDF-1.4\nthis is not a pdf at all'));
		expect(e.status).toBe(422);
	});
});
