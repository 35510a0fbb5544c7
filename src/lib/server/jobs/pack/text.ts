// Text for the job pack: the app's own Figtree font (the @fontsource/figtree files the web
// pages use, OFL 1.1), measured and wrapped, with characters outside the font replaced by a
// readable stand-in rather than dropped or drawn as an empty box.
import { createRequire } from 'node:module';
import { readFile } from 'node:fs/promises';
import { inflateSync } from 'node:zlib';
import type { PDFDocument, PDFFont, PDFPage, RGB } from 'pdf-lib';

const require = createRequire(import.meta.url);

/** Figtree comes as Latin and Latin Extended subsets; a character is drawn with the first one that has it. */
const FONT_FILES = {
	regular: ['figtree-latin-400-normal.woff', 'figtree-latin-ext-400-normal.woff'],
	bold: ['figtree-latin-700-normal.woff', 'figtree-latin-ext-700-normal.woff']
} as const;

/**
 * WOFF 1.0 (W3C Recommendation, 2012) to the plain sfnt (TrueType/OpenType) it wraps: each
 * table is zlib-compressed unless its compressed length equals its original length. The font
 * reader would otherwise inflate a table on every access, which made long packs slow.
 */
export function woffToSfnt(woff: Uint8Array): Uint8Array {
	const src = new DataView(woff.buffer, woff.byteOffset, woff.byteLength);
	if (woff.byteLength < 44 || src.getUint32(0) !== 0x774f4646) throw new RangeError('not a WOFF 1.0 font');
	const flavor = src.getUint32(4);
	const numTables = src.getUint16(12);
	const tables: Array<{ tag: number; checksum: number; data: Uint8Array }> = [];
	for (let i = 0; i < numTables; i++) {
		const e = 44 + i * 20;
		const tag = src.getUint32(e);
		const offset = src.getUint32(e + 4);
		const compLength = src.getUint32(e + 8);
		const origLength = src.getUint32(e + 12);
		const checksum = src.getUint32(e + 16);
		const raw = woff.subarray(offset, offset + compLength);
		const data = compLength < origLength ? new Uint8Array(inflateSync(raw)) : raw;
		if (data.byteLength !== origLength) throw new RangeError('WOFF table length does not match');
		tables.push({ tag, checksum, data });
	}
	tables.sort((a, b) => a.tag - b.tag);
	const headerLength = 12 + numTables * 16;
	const total = tables.reduce((n, t) => n + ((t.data.byteLength + 3) & ~3), headerLength);
	const out = new Uint8Array(total);
	const dst = new DataView(out.buffer);
	let pow = 1;
	let log = 0;
	while (pow * 2 <= numTables) {
		pow *= 2;
		log++;
	}
	dst.setUint32(0, flavor);
	dst.setUint16(4, numTables);
	dst.setUint16(6, pow * 16);
	dst.setUint16(8, log);
	dst.setUint16(10, numTables * 16 - pow * 16);
	let at = headerLength;
	tables.forEach((t, i) => {
		const r = 12 + i * 16;
		dst.setUint32(r, t.tag);
		dst.setUint32(r + 4, t.checksum);
		dst.setUint32(r + 8, at);
		dst.setUint32(r + 12, t.data.byteLength);
		out.set(t.data, at);
		at += (t.data.byteLength + 3) & ~3;
	});
	return out;
}

let fontBytes: Promise<Record<keyof typeof FONT_FILES, Uint8Array[]>> | null = null;

function loadFontBytes() {
	fontBytes ??= (async () => {
		const read = (names: readonly string[]) =>
			Promise.all(names.map(async (n) => woffToSfnt(new Uint8Array(await readFile(require.resolve(`@fontsource/figtree/files/${n}`))))));
		const [regular, bold] = await Promise.all([read(FONT_FILES.regular), read(FONT_FILES.bold)]);
		return { regular, bold };
	})();
	fontBytes.catch(() => (fontBytes = null));
	return fontBytes;
}

/** Stand-ins for characters Figtree's subsets lack (the trade texts use ≥ and the like). */
const SUBSTITUTES: Record<string, string> = {
	'≥': '>=',
	'≤': '<=',
	'≠': '!=',
	'≈': '~',
	'→': '->',
	'←': '<-',
	Ω: 'ohm',
	'√': 'sqrt',
	'✓': 'ok',
	'●': 'o',
	'▲': '^',
	'■': '#',
	'\t': ' '
};

interface Face {
	fonts: PDFFont[];
	sets: Array<Set<number>>;
}

export interface Style {
	size: number;
	bold?: boolean;
	color?: RGB;
}

export class Typesetter {
	private constructor(
		private readonly regular: Face,
		private readonly bold: Face
	) {}

	static async embed(doc: PDFDocument): Promise<Typesetter> {
		const bytes = await loadFontBytes();
		const face = async (files: Uint8Array[]): Promise<Face> => {
			const fonts = await Promise.all(files.map((b) => doc.embedFont(b, { subset: true })));
			return { fonts, sets: fonts.map((f) => new Set(f.getCharacterSet())) };
		};
		return new Typesetter(await face(bytes.regular), await face(bytes.bold));
	}

	private face(bold?: boolean) {
		return bold ? this.bold : this.regular;
	}

	/** The text as it can be drawn: no control characters, stand-ins for what the font lacks. */
	clean(text: string, bold?: boolean): string {
		const face = this.face(bold);
		let out = '';
		for (const ch of String(text ?? '').normalize('NFC')) {
			const cp = ch.codePointAt(0)!;
			if (cp < 0x20 || (cp >= 0x7f && cp < 0xa0)) {
				if (ch === '\t') out += ' ';
				continue;
			}
			if (face.sets.some((s) => s.has(cp))) out += ch;
			else if (SUBSTITUTES[ch] !== undefined) out += SUBSTITUTES[ch];
			else out += '?';
		}
		return out;
	}

	/** Consecutive characters drawn with the same font of the face. */
	private runs(text: string, bold?: boolean): Array<{ font: PDFFont; text: string }> {
		const face = this.face(bold);
		const runs: Array<{ font: PDFFont; text: string }> = [];
		for (const ch of text) {
			const cp = ch.codePointAt(0)!;
			const i = Math.max(
				0,
				face.sets.findIndex((s) => s.has(cp))
			);
			const font = face.fonts[i];
			const last = runs[runs.length - 1];
			if (last && last.font === font) last.text += ch;
			else runs.push({ font, text: ch });
		}
		return runs;
	}

	/** Widths at size 1 of text already cleaned, per weight; text width is linear in the size. */
	private readonly widths = [new Map<string, number>(), new Map<string, number>()];

	private readonly runWidths = new Map<PDFFont, Map<string, number>>();

	/** Width at size 1 of a run in one font, remembered: measuring lays the text out, which is slow. */
	private runWidth(font: PDFFont, text: string): number {
		let cache = this.runWidths.get(font);
		if (!cache) this.runWidths.set(font, (cache = new Map()));
		let w = cache.get(text);
		if (w === undefined) {
			w = font.widthOfTextAtSize(text, 1);
			if (cache.size > 20_000) cache.clear();
			cache.set(text, w);
		}
		return w;
	}

	private measure(clean: string, style: Style): number {
		const cache = this.widths[style.bold ? 1 : 0];
		let w = cache.get(clean);
		if (w === undefined) {
			w = this.runs(clean, style.bold).reduce((sum, r) => sum + this.runWidth(r.font, r.text), 0);
			if (cache.size > 20_000) cache.clear();
			cache.set(clean, w);
		}
		return w * style.size;
	}

	width(text: string, style: Style): number {
		return this.measure(this.clean(text, style.bold), style);
	}

	/** Draws one line with its baseline at y; returns the width drawn. */
	draw(page: PDFPage, text: string, x: number, y: number, style: Style): number {
		const clean = this.clean(text, style.bold);
		let at = x;
		for (const r of this.runs(clean, style.bold)) {
			page.drawText(r.text, { x: at, y, size: style.size, font: r.font, color: style.color });
			at += this.runWidth(r.font, r.text) * style.size;
		}
		return at - x;
	}

	/** Lines of at most `width`; breaks at spaces, and inside a word only when the word alone is too wide. */
	wrap(text: string, width: number, style: Style): string[] {
		const lines: string[] = [];
		const space = this.measure(' ', style);
		for (const paragraph of this.clean(String(text ?? '').replace(/\r\n?/g, '\n'), style.bold).split('\n')) {
			const words = paragraph.split(/ +/).filter((w) => w.length > 0);
			if (words.length === 0) {
				lines.push('');
				continue;
			}
			let line = '';
			let lineW = 0;
			for (const word of words) {
				const ww = this.measure(word, style);
				if (line && lineW + space + ww <= width) {
					line += ` ${word}`;
					lineW += space + ww;
					continue;
				}
				if (line) lines.push(line);
				if (ww <= width) {
					line = word;
					lineW = ww;
					continue;
				}
				// A word wider than the line (a long reference or a URL): cut it where it must.
				line = '';
				lineW = 0;
				for (const ch of word) {
					const cw = this.measure(ch, style);
					if (line && lineW + cw > width) {
						lines.push(line);
						line = '';
						lineW = 0;
					}
					line += ch;
					lineW += cw;
				}
			}
			if (line) lines.push(line);
		}
		return lines;
	}
}
