import { getDocument, OPS } from 'pdfjs-dist/legacy/build/pdf.mjs';
import { describe, expect, test } from 'vitest';
import { formatWhen, PAPER_SIZES, renderJobPack } from '../../../src/lib/server/jobs/pack/render';
import { woffToSfnt } from '../../../src/lib/server/jobs/pack/text';
import type { JobPackInput } from '../../../src/lib/server/jobs/pack/types';
import { SAFETY_CAUTIONS } from '../../../src/lib/trade';
import { packInput } from '../../helpers/job-pack';

interface ParsedPage {
	width: number;
	height: number;
	text: string;
	/** Images painted on the page (the board photo). */
	images: number;
}

/** Parses the PDF back with pdfjs-dist: page sizes and the text of each page, white space collapsed. */
async function parse(bytes: Uint8Array): Promise<ParsedPage[]> {
	const pdf = await getDocument({ data: bytes.slice(), useSystemFonts: false, isEvalSupported: false }).promise;
	const pages: ParsedPage[] = [];
	for (let i = 1; i <= pdf.numPages; i++) {
		const page = await pdf.getPage(i);
		const [x0, y0, x1, y1] = page.view;
		const content = await page.getTextContent();
		const text = content.items
			.map((it) => ('str' in it ? it.str + (it.hasEOL ? '\n' : '') : ''))
			.join('')
			.replace(/\s+/g, ' ');
		const ops = await page.getOperatorList();
		const images = ops.fnArray.filter((op) => op === OPS.paintImageXObject).length;
		pages.push({ width: x1 - x0, height: y1 - y0, text, images });
	}
	await pdf.destroy();
	return pages;
}

const all = (pages: ParsedPage[]) => pages.map((p) => p.text).join(' ');

// Rendering and parsing take a few seconds on a busy machine.
describe('renderJobPack', { timeout: 60_000 }, () => {
	test('A4: every point label, the LOCKOUT banner, the cautions and the bill of materials are in the text', async () => {
		const input = await packInput({ paper: 'A4', count: 3 });
		const bytes = await renderJobPack(input);
		expect(Buffer.from(bytes.subarray(0, 5)).toString('latin1')).toBe('%PDF-');
		const pages = await parse(bytes);
		// ISO 216 A4: 210 × 297 mm = 595.28 × 841.89 pt.
		for (const p of pages) {
			expect(p.width).toBeCloseTo(595.28, 1);
			expect(p.height).toBeCloseTo(841.89, 1);
		}
		const text = all(pages);
		for (const p of input.points) expect(text).toContain(p.label);
		expect(input.job.lockoutRequired).toBe(true);
		expect(text).toContain('LOCKOUT REQUIRED');
		// The cautions, ≥ and the like replaced where Figtree has no glyph.
		for (const c of SAFETY_CAUTIONS) expect(text).toContain(c.text);
		expect(text).toMatch(/Local codes, site rules, permits and licensed practice come first/);
		for (const m of input.materials) expect(text).toContain(m.item);
		expect(text).toContain('Sensor cable, 2-core 0.75 mm² class 5');
		expect(text).toContain('15 % margin over the measured route length');
		for (const tool of input.tools) expect(text).toContain(tool);
		expect(pages[0].images).toBe(1); // the board photo
		expect(text).toContain('J-0007');
		expect(text).toContain('Harrowgate Water Services');
		expect(text).toContain('Tomas Reed');
		expect(text).toContain('2026-12-08 07:00 UTC to 2026-12-08 12:00 UTC');
		expect(text).toContain('Installed by');
		expect(text).toContain('Checked by');
		expect(text).toContain('Signature');
		// Stud preparation in aluminium: 5.0 mm tap drill, 18 mm hole, 12 mm thread (trade module).
		expect(text).toContain('drill Ø5.0 × 18 mm');
		expect(text).toContain('Drill the 5.0 mm tap drill hole 18 mm deep');
		expect(text).toContain('SAFETY: Machine stopped, isolated and locked out.');
		expect(pages.at(-1)!.text).toContain(`page ${pages.length} of ${pages.length}`);
		expect(pages[0].text).toContain(`page 1 of ${pages.length}`);
	});

	test('Letter: 612 × 792 pt (8.5 × 11 in at 72 pt/in); a JPEG photo is embedded too', async () => {
		const pages = await parse(await renderJobPack(await packInput({ paper: 'Letter', count: 3, photoFormat: 'jpeg' })));
		expect(pages[0].images).toBe(1);
		expect(PAPER_SIZES.Letter).toEqual([612, 792]);
		for (const p of pages) {
			expect(p.width).toBeCloseTo(612, 3);
			expect(p.height).toBeCloseTo(792, 3);
		}
		expect(all(pages)).toContain('P1 DE radial H');
	});

	test('40 points paginate: every label present, pages numbered "page N of M" in order', async () => {
		const input = await packInput({ count: 40 });
		const pages = await parse(await renderJobPack(input));
		expect(pages.length).toBeGreaterThan(10);
		pages.forEach((p, i) => expect(p.text).toContain(`page ${i + 1} of ${pages.length}`));
		const text = all(pages);
		for (const p of input.points) expect(text).toContain(`${p.number} · ${p.label}`);
		expect(text).toContain('Sign-off');
	});

	test('no photo, no lockout, odd text: a plain frame, the lockout note, stand-ins for missing glyphs, never a crash', async () => {
		const base = await packInput({ count: 1, photo: false });
		const input: JobPackInput = {
			...base,
			job: { ...base.job, lockoutRequired: false, assignee: null, outageStart: null, outageEnd: null, due: null },
			points: base.points.map((p) => ({ ...p, label: 'Pump ≥ 3 → “fan” 泵 \u0007', notes: 'x'.repeat(400) }))
		};
		const pages = await parse(await renderJobPack(input));
		const text = all(pages);
		expect(pages.every((p) => p.images === 0)).toBe(true);
		expect(text).toContain('No photo on this board');
		expect(text).not.toContain('LOCKOUT REQUIRED');
		expect(text).toContain('no drilling, tapping or grinding is planned');
		expect(text).toContain('Pump >= 3 -> “fan” ?');
		expect(text).toContain('not assigned');
	});

	test('a photo that cannot be read falls back to the frame', async () => {
		const base = await packInput({ count: 1 });
		const input: JobPackInput = {
			...base,
			boards: base.boards.map((b) => ({ ...b, image: { ...b.image!, bytes: new Uint8Array([1, 2, 3]) } }))
		};
		expect(all(await parse(await renderJobPack(input)))).toContain('The board photo could not be read');
	});
});

describe('formatWhen', () => {
	test('ISO timestamps in UTC, dates as they are, anything else as given', () => {
		expect(formatWhen('2026-12-08T07:00:00Z')).toBe('2026-12-08 07:00 UTC');
		expect(formatWhen('2026-12-08T08:00:00+01:00')).toBe('2026-12-08 07:00 UTC');
		expect(formatWhen('2026-12-09')).toBe('2026-12-09');
		expect(formatWhen('next Tuesday')).toBe('next Tuesday');
		expect(formatWhen(null)).toBe('—');
	});
});

describe('woffToSfnt', () => {
	test("unpacks the app's Figtree WOFF into a TrueType font the font reader opens with the same glyphs", async () => {
		const { readFile } = await import('node:fs/promises');
		const { createRequire } = await import('node:module');
		const fontkit = (await import('@pdf-lib/fontkit')).default;
		const woff = new Uint8Array(
			await readFile(createRequire(import.meta.url).resolve('@fontsource/figtree/files/figtree-latin-400-normal.woff'))
		);
		const sfnt = woffToSfnt(woff);
		// TrueType outlines: sfnt version 0x00010000 (OpenType spec, "Organization of an OpenType Font").
		expect(new DataView(sfnt.buffer).getUint32(0)).toBe(0x00010000);
		const a = fontkit.create(woff as Buffer);
		const b = fontkit.create(sfnt as Buffer);
		expect(b.numGlyphs).toBe(a.numGlyphs);
		expect(b.characterSet).toEqual(a.characterSet);
		expect(b.layout('Ø30 mm').advanceWidth).toBe(a.layout('Ø30 mm').advanceWidth);
		expect(() => woffToSfnt(new Uint8Array(64))).toThrow(RangeError);
	});
});
