import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { DEFAULT_LIMITS, pdfRenderSize, processMedia } from '../../../src/lib/server/media/process';
import { cleanFilename, dispositionHeader, downloadName, MAX_FILENAME_LENGTH } from '../../../src/lib/server/media/filename';
import { idField, isUuid, optionalIdField, rowRefSchema } from '../../../src/lib/schemas/ids';
import { pdfPage, pixel } from '../../helpers/images';

const budget = Math.min(DEFAULT_LIMITS.maxPixels, DEFAULT_LIMITS.pdfRenderMaxPixels);

describe('PDF pages are drawn within a pixel budget', () => {
	it('keeps an ordinary drawing at about 200 dpi', () => {
		// A3 landscape: 1191 × 842 pt → 200/72 px per pt.
		expect(pdfRenderSize(1191, 842, DEFAULT_LIMITS)).toEqual({
			width: Math.floor((1191 * 200) / 72),
			height: Math.floor((842 * 200) / 72)
		});
	});

	it('draws an A0 sheet at the full display edge', () => {
		const { width, height } = pdfRenderSize(3370, 2384, DEFAULT_LIMITS);
		expect(width).toBe(DEFAULT_LIMITS.displayMaxEdge);
		expect(width * height).toBeLessThanOrEqual(budget);
	});

	it('scales a 200 × 200 inch page down to the budget instead of refusing it', () => {
		const { width, height } = pdfRenderSize(14400, 14400, DEFAULT_LIMITS);
		expect(width * height).toBeLessThanOrEqual(budget);
		// Within 0.1 % of the budget: the page is drawn as large as allowed.
		expect(width * height).toBeGreaterThan(budget * 0.999);
		expect(width).toBe(height);
	});

	it('takes the smaller of the PDF budget and the picture limit', () => {
		const limits = { ...DEFAULT_LIMITS, maxPixels: 2_000_000 };
		const { width, height } = pdfRenderSize(14400, 14400, limits);
		expect(width * height).toBeLessThanOrEqual(2_000_000);
		expect(width * height).toBeGreaterThan(1_990_000);
	});

	it('never draws a pixel dimension of 0, even for a hair-thin page', () => {
		const { width, height } = pdfRenderSize(14400, 0.01, DEFAULT_LIMITS);
		expect(width).toBe(DEFAULT_LIMITS.displayMaxEdge);
		expect(height).toBe(1);
	});

	it('refuses a page with no size', () => {
		for (const [w, h] of [
			[0, 100],
			[100, -1],
			[Number.NaN, 100],
			[Number.POSITIVE_INFINITY, 10]
		]) {
			expect(() => pdfRenderSize(w!, h!, DEFAULT_LIMITS)).toThrow(/no size/);
		}
	});

	it('processes a PDF whose page is 200 × 200 inches within the budget', async () => {
		const r = await processMedia(await pdfPage(14400, 14400));
		expect(r.mimeType).toBe('application/pdf');
		expect(r.display.width * r.display.height).toBeLessThanOrEqual(budget);
		expect(r.display.width).toBe(r.display.height);
		const meta = await sharp(r.display.bytes).metadata();
		expect([meta.width, meta.height]).toEqual([r.display.width, r.display.height]);
		// Opaque, three channels: the page's alpha is dropped, not kept as an all-255 plane.
		expect(meta.channels).toBe(3);
		// The blue block drawn at 30–70 % across and 50–70 % from the top is where it belongs.
		const [red, , blue] = await pixel(r.display.bytes, Math.round(r.display.width * 0.5), Math.round(r.display.height * 0.6));
		expect(blue).toBeGreaterThan(120);
		expect(red).toBeLessThan(60);
		const [wr, wg, wb] = await pixel(r.display.bytes, Math.round(r.display.width * 0.15), Math.round(r.display.height * 0.13));
		expect(Math.min(wr!, wg!, wb!)).toBeGreaterThan(200);
	});
});

describe('stored file names', () => {
	it('strips bidi controls, so a name cannot pretend to end in another extension', () => {
		// "invoice‮gpj.exe" shows as "invoiceexe.jpg" in a right-to-left override.
		expect(cleanFilename('invoice\u202Egpj.exe')).toBe('invoicegpj.exe');
		for (const c of [
			'\u202A',
			'\u202B',
			'\u202C',
			'\u202D',
			'\u202E',
			'\u2066',
			'\u2067',
			'\u2068',
			'\u2069',
			'\u200E',
			'\u200F',
			'\u061C'
		]) {
			expect(cleanFilename(`pump${c}-2.jpg`), `U+${c.codePointAt(0)!.toString(16)}`).toBe('pump-2.jpg');
		}
	});

	it('strips C0, C1, DEL and zero-width characters; whitespace controls become one space', () => {
		expect(cleanFilename('a\u0000b\u0007c\u001b\u007f\u0080\u009fd.png')).toBe('abcd.png');
		expect(cleanFilename('\uFEFFmo\u200Bt\u200Co\u200Dr.jpg')).toBe('motor.jpg');
		expect(cleanFilename('fan\tskid\r\nside\u2028view\u0085left.jpg')).toBe('fan skid side view left.jpg');
		expect(cleanFilename('soft\u00ADhyphen.pdf')).toBe('softhyphen.pdf');
	});

	it('keeps ordinary names in any script, composed (NFC)', () => {
		expect(cleanFilename('Pumpe Übersicht.pdf')).toBe('Pumpe Übersicht.pdf');
		expect(cleanFilename('Pumpe U\u0308bersicht.pdf')).toBe('Pumpe Übersicht.pdf');
		expect(cleanFilename('مضخة 2.jpg')).toBe('مضخة 2.jpg');
		expect(cleanFilename('ポンプ.png')).toBe('ポンプ.png');
	});

	it('keeps the last path segment and drops quotes, angle brackets and edge dots', () => {
		expect(cleanFilename('C:\\Users\\tech\\Desktop\\pump.jpg')).toBe('pump.jpg');
		expect(cleanFilename('../../etc/passwd')).toBe('passwd');
		expect(cleanFilename('"<pump>" side.jpg')).toBe('pump side.jpg');
		expect(cleanFilename('.hidden.jpg')).toBe('hidden.jpg');
		expect(cleanFilename('name.jpg. . ')).toBe('name.jpg');
	});

	it('falls back to a plain name when nothing is left', () => {
		for (const name of ['', '   ', '\u202E\u200B\uFEFF', '...', '/', '\u0000\u0001', '"<>"']) {
			expect(cleanFilename(name, 'jpg'), JSON.stringify(name)).toBe('upload.jpg');
		}
		expect(cleanFilename('')).toBe('upload');
	});

	it('cuts a long name to the limit and keeps its extension', () => {
		const long = `${'pump-house-'.repeat(40)}.jpeg`;
		const clean = cleanFilename(long);
		expect([...clean].length).toBe(MAX_FILENAME_LENGTH);
		expect(clean.endsWith('.jpeg')).toBe(true);
		// Counted in characters: an emoji is never cut in half.
		const emoji = cleanFilename(`${'🔧'.repeat(200)}.png`);
		expect([...emoji].length).toBe(MAX_FILENAME_LENGTH);
		expect(emoji.endsWith('🔧.png')).toBe(true);
		expect(Buffer.from(emoji, 'utf8').toString('utf8')).toBe(emoji);
	});
});

describe('download names and headers', () => {
	it('gives the original the extension of its real type', () => {
		expect(downloadName('pump.jpg', 'image/jpeg', 'jpg')).toBe('pump.jpg');
		expect(downloadName('pump.JPEG', 'image/jpeg', 'jpg')).toBe('pump.JPEG');
		expect(downloadName('plan.html', 'application/pdf', 'pdf')).toBe('plan.html.pdf');
		expect(downloadName('photo.jpg', 'image/png', 'png')).toBe('photo.jpg.png');
		expect(downloadName('scan', 'application/pdf', 'pdf')).toBe('scan.pdf');
		expect(downloadName('', 'image/webp', 'webp')).toBe('upload.webp');
	});

	it('writes an ASCII filename and the full name as RFC 8187 filename*', () => {
		expect(dispositionHeader('attachment', 'pump.jpg')).toBe('attachment; filename="pump.jpg"');
		expect(dispositionHeader('attachment', 'Pumpe Übersicht "A".pdf')).toBe(
			`attachment; filename="Pumpe Ubersicht A.pdf"; filename*=UTF-8''Pumpe%20%C3%9Cbersicht%20A.pdf`
		);
		// % and \ are not left in the plain filename, where some clients would decode or unescape them.
		expect(dispositionHeader('attachment', 'Ü 100%.pdf')).toBe(`attachment; filename="U 100_.pdf"; filename*=UTF-8''%C3%9C%20100%25.pdf`);
		// Whatever was stored before names were cleaned, the header carries no bidi control.
		const bidi = dispositionHeader('attachment', 'invoice\u202Egpj.exe');
		expect(bidi).toBe('attachment; filename="invoicegpj.exe"');
		// Header values are ASCII only.
		expect(dispositionHeader('inline', 'ポンプ 100%.png')).toMatch(/^[\x20-\x7e]+$/);
	});
});

describe('ids from forms, bodies and query strings', () => {
	const UUID = '3f2504e0-4f89-41d3-9a0c-0305e82c3301';
	it('accepts a uuid and refuses anything else with the message', () => {
		expect(isUuid(UUID)).toBe(true);
		expect(idField('bad').parse(` ${UUID} `)).toBe(UUID);
		for (const bad of [
			'',
			'x',
			'------------------------------------',
			`${UUID}x`,
			"1' or '1'='1",
			'3f2504e0-4f89-41d3-9a0c-0305e82c330g',
			42,
			null,
			[UUID],
			{ id: UUID }
		]) {
			const r = rowRefSchema('Reload the page.').safeParse({ id: bad });
			expect(r.success, JSON.stringify(bad)).toBe(false);
			expect(r.error!.issues[0]!.message).toBe('Reload the page.');
		}
	});

	it('an optional id is null when blank', () => {
		expect(optionalIdField('bad').parse('')).toBeNull();
		expect(optionalIdField('bad').parse(undefined)).toBeNull();
		expect(optionalIdField('bad').parse(UUID)).toBe(UUID);
		expect(optionalIdField('bad').safeParse('nope').success).toBe(false);
	});
});
