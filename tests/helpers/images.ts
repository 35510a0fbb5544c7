// Test pictures made with sharp at run time (no binary fixtures in the repository).
import sharp from 'sharp';
import { deflateSync, crc32 } from 'node:zlib';

/** A photo-like picture: a dark machine body on a light background, with a marker in the top-left corner. */
export async function picture(width: number, height: number) {
	const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">
		<rect width="100%" height="100%" fill="#d8dde3"/>
		<rect x="${width * 0.2}" y="${height * 0.3}" width="${width * 0.6}" height="${height * 0.4}" fill="#2f4f6f"/>
		<rect x="0" y="0" width="${Math.round(width / 4)}" height="${Math.round(height / 4)}" fill="#ff0000"/>
	</svg>`;
	return sharp(Buffer.from(svg)).removeAlpha();
}

export async function jpeg(width = 800, height = 600) {
	return (await picture(width, height)).jpeg({ quality: 85 }).toBuffer();
}
export async function png(width = 800, height = 600) {
	return (await picture(width, height)).png().toBuffer();
}
export async function webp(width = 800, height = 600) {
	return (await picture(width, height)).webp({ quality: 80 }).toBuffer();
}

/**
 * A JPEG as a camera held on its side writes it: pixels stored landscape (red marker top-left)
 * with EXIF orientation 6 ("rotate 90° clockwise to view"), and a GPS position.
 */
export async function sidewaysJpegWithGps(width = 600, height = 400) {
	return (await picture(width, height))
		.jpeg({ quality: 90 })
		.withMetadata({ orientation: 6 })
		.withExifMerge({
			IFD0: { Orientation: '6', Make: 'Test camera', Model: 'T-1' },
			IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '0/1 7/1 0/1' }
		})
		.toBuffer();
}

/** A PNG whose header claims width × height pixels, with almost no data: a decompression bomb's shape. */
export function pngHeaderClaiming(width: number, height: number) {
	const chunk = (type: string, data: Buffer) => {
		const len = Buffer.alloc(4);
		len.writeUInt32BE(data.length);
		const td = Buffer.concat([Buffer.from(type, 'latin1'), data]);
		const crc = Buffer.alloc(4);
		crc.writeUInt32BE(crc32(td) >>> 0);
		return Buffer.concat([len, td, crc]);
	};
	const ihdr = Buffer.alloc(13);
	ihdr.writeUInt32BE(width, 0);
	ihdr.writeUInt32BE(height, 4);
	ihdr[8] = 8; // bit depth
	ihdr[9] = 0; // greyscale
	return Buffer.concat([
		Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
		chunk('IHDR', ihdr),
		chunk('IDAT', deflateSync(Buffer.alloc(1024))),
		chunk('IEND', Buffer.alloc(0))
	]);
}

/** A one-page PDF drawing written by hand (text and a filled rectangle). */
export function pdfDrawing(title = 'Pump set general arrangement') {
	const content = `BT /F1 24 Tf 72 720 Td (${title}) Tj ET 0.1 0.2 0.6 rg 100 100 300 200 re f`;
	const objs = [
		'<< /Type /Catalog /Pages 2 0 R >>',
		'<< /Type /Pages /Kids [3 0 R] /Count 1 >>',
		'<< /Type /Page /Parent 2 0 R /MediaBox [0 0 842 595] /Contents 4 0 R /Resources << /Font << /F1 5 0 R >> >> >>',
		`<< /Length ${content.length} >>\nstream\n${content}\nendstream`,
		'<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica >>'
	];
	let out = '%PDF-1.4\n';
	const offsets: number[] = [];
	objs.forEach((o, i) => {
		offsets.push(out.length);
		out += `${i + 1} 0 obj\n${o}\nendobj\n`;
	});
	const xref = out.length;
	out += `xref\n0 ${objs.length + 1}\n0000000000 65535 f \n` + offsets.map((o) => `${String(o).padStart(10, '0')} 00000 n \n`).join('');
	out += `trailer\n<< /Size ${objs.length + 1} /Root 1 0 R >>\nstartxref\n${xref}\n%%EOF\n`;
	return Buffer.from(out, 'latin1');
}

export const SVG_FILE = Buffer.from(
	'<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"><script>alert(1)</script></svg>'
);
export const HTML_FILE = Buffer.from('<!DOCTYPE html><html><body><script>alert(1)</script></body></html>');

/** Colour of one pixel of a picture (after decoding), as [r, g, b]. */
export async function pixel(bytes: Buffer, x: number, y: number) {
	const { data, info } = await sharp(bytes).removeAlpha().raw().toBuffer({ resolveWithObject: true });
	const i = (y * info.width + x) * info.channels;
	return [data[i], data[i + 1], data[i + 2]];
}

/** Whether an EXIF block has a GPS sub-directory (tag 0x8825, either byte order). */
export function hasGpsIfd(exif: Buffer | undefined) {
	if (!exif) return false;
	return exif.includes(Buffer.from([0x88, 0x25])) || exif.includes(Buffer.from([0x25, 0x88]));
}

/**
 * A one-page PDF drawing of any page size, made with pdf-lib: a frame, a grid and a title block.
 * 72 pt = 1 inch; 14 400 pt (200 in) is the largest page the PDF format allows.
 */
export async function pdfPage(widthPt: number, heightPt: number) {
	const { PDFDocument, StandardFonts, rgb } = await import('pdf-lib');
	const doc = await PDFDocument.create();
	const page = doc.addPage([widthPt, heightPt]);
	const font = await doc.embedFont(StandardFonts.Helvetica);
	const m = Math.min(widthPt, heightPt) * 0.02;
	page.drawRectangle({ x: m, y: m, width: widthPt - 2 * m, height: heightPt - 2 * m, borderColor: rgb(0, 0, 0), borderWidth: m / 10 });
	for (let i = 1; i < 20; i++) {
		page.drawLine({
			start: { x: (widthPt * i) / 20, y: m },
			end: { x: (widthPt * i) / 20, y: heightPt - m },
			thickness: m / 40,
			color: rgb(0.6, 0.6, 0.6)
		});
		page.drawLine({
			start: { x: m, y: (heightPt * i) / 20 },
			end: { x: widthPt - m, y: (heightPt * i) / 20 },
			thickness: m / 40,
			color: rgb(0.6, 0.6, 0.6)
		});
	}
	page.drawRectangle({ x: widthPt * 0.3, y: heightPt * 0.3, width: widthPt * 0.4, height: heightPt * 0.2, color: rgb(0.1, 0.2, 0.6) });
	page.drawText('Fan skid general arrangement', { x: m * 2, y: m * 2, size: m, font, color: rgb(0, 0, 0) });
	return Buffer.from(await doc.save());
}
