// The job pack PDF: everything an installer needs on paper for one job, drawn with pdf-lib
// from a JobPackInput. The board image is drawn here from the revision's data (photo, then
// zones, routes and numbered points as vectors), never taken from someone's screen.
import fontkit from '@pdf-lib/fontkit';
import { PDFDocument, rgb, type PDFImage, type PDFPage, type RGB } from 'pdf-lib';
import type { ChecklistPhase } from '../../../trade/checklist';
import { MATERIAL_LABEL, MATERIALS, MOUNTING_LABEL, type Material } from '../../../trade/evaluate-point';
import { SEVERITY_META, worstSeverity, type Severity } from '../../../trade/findings';
import { fmt } from '../../../trade/inputs';
import { preparationSummary } from '../../../trade/job-plan';
import { Typesetter, type Style } from './text';
import type { JobPackBoardImage, JobPackInput, JobPackPoint, PaperSize } from './types';

/** Page sizes in PDF points (1/72 in): ISO 216 A4 is 210 × 297 mm; US Letter 8.5 × 11 in. */
export const PAPER_SIZES: Readonly<Record<PaperSize, readonly [number, number]>> = {
	A4: [595.28, 841.89],
	Letter: [612, 792]
};

const MARGIN = 40;
const HEADER_SPACE = 22; // running header on pages after the first
const FOOTER_SPACE = 24;

const INK = rgb(0.09, 0.125, 0.165);
const MUTED = rgb(0.36, 0.4, 0.45);
const RULE = rgb(0.8, 0.82, 0.85);
const SHADE = rgb(0.95, 0.96, 0.97);
const BRAND = rgb(0.122, 0.373, 0.545);
const WHITE = rgb(1, 1, 1);
const DANGER = rgb(0.7, 0.15, 0.12);
const SAFETY_BAND = rgb(1, 0.95, 0.8);
const KEEP_OUT = rgb(0.776, 0.157, 0.157);
const SEVERITY_FILL: Record<Severity, RGB> = {
	pass: rgb(0.122, 0.616, 0.333),
	warn: rgb(0.949, 0.663, 0),
	fail: rgb(0.827, 0.184, 0.184)
};

const BODY: Style = { size: 9, color: INK };
const LINE = 1.3; // line height as a multiple of the font size

const PHASE_LABEL: Record<ChecklistPhase, string> = {
	before: 'Before work',
	seat: 'Seat',
	mount: 'Mounting',
	electrical: 'Electrical',
	after: 'Commissioning'
};

export interface Column {
	title: string;
	/** Share of the content width. */
	weight: number;
}

export interface Cell {
	text: string;
	bold?: boolean;
	/** Draws the severity shape before the text. */
	severity?: Severity;
}

/** When a pack time is an ISO 8601 timestamp, show it as "2026-12-03 08:00 UTC"; otherwise as given. */
export function formatWhen(value: string | null | undefined): string {
	if (!value) return '—';
	const m = /^(\d{4}-\d{2}-\d{2})(?:[T ](\d{2}:\d{2})(?::\d{2}(?:\.\d+)?)?(Z|[+-]\d{2}:?\d{2})?)?$/.exec(value.trim());
	if (!m) return value;
	if (!m[2]) return m[1];
	if (m[3] === 'Z' || m[3] === '+00:00' || m[3] === '+0000') return `${m[1]} ${m[2]} UTC`;
	if (m[3]) {
		const d = new Date(value);
		if (!Number.isNaN(d.getTime())) return `${d.toISOString().slice(0, 10)} ${d.toISOString().slice(11, 16)} UTC`;
	}
	return `${m[1]} ${m[2]}`;
}

const isMaterial = (m: unknown): m is Material => (MATERIALS as readonly unknown[]).includes(m);

/** Draws the severity shape of the board (circle good, triangle check, square fail) centred on x, y. */
function drawSeverityShape(page: PDFPage, s: Severity, x: number, y: number, r: number, border = WHITE) {
	const shape = SEVERITY_META[s].shape;
	const opts = { color: SEVERITY_FILL[s], borderColor: border, borderWidth: Math.max(0.6, r / 6) };
	if (shape === 'circle') page.drawCircle({ x, y, size: r, ...opts });
	else if (shape === 'square') page.drawRectangle({ x: x - r * 0.9, y: y - r * 0.9, width: r * 1.8, height: r * 1.8, ...opts });
	else {
		const h = r * 1.15;
		page.drawSvgPath(`M 0 ${-h} L ${h * 1.1} ${h * 0.8} L ${-h * 1.1} ${h * 0.8} Z`, { x, y, ...opts });
	}
}

class PackWriter {
	readonly pages: PDFPage[] = [];
	page!: PDFPage;
	y = 0;
	readonly pageWidth: number;
	readonly pageHeight: number;

	constructor(
		readonly doc: PDFDocument,
		readonly t: Typesetter,
		readonly input: JobPackInput
	) {
		[this.pageWidth, this.pageHeight] = PAPER_SIZES[input.paper] ?? PAPER_SIZES.A4;
	}

	get left() {
		return MARGIN;
	}
	get width() {
		return this.pageWidth - 2 * MARGIN;
	}
	get bottom() {
		return MARGIN + FOOTER_SPACE;
	}
	/** Height for content on a fresh page after the first. */
	get fullHeight() {
		return this.pageHeight - 2 * MARGIN - HEADER_SPACE - FOOTER_SPACE;
	}

	newPage() {
		this.page = this.doc.addPage([this.pageWidth, this.pageHeight]);
		this.pages.push(this.page);
		this.y = this.pageHeight - MARGIN;
		if (this.pages.length > 1) {
			const j = this.input.job;
			this.t.draw(this.page, `${j.reference} · ${j.title}`, this.left, this.y - 8, { size: 7.5, color: MUTED });
			this.y -= HEADER_SPACE;
		}
	}

	/** Starts a new page unless `h` points still fit. */
	ensure(h: number) {
		if (this.y - h < this.bottom) this.newPage();
	}

	gap(h: number) {
		this.y -= h;
	}

	/** Wrapped text, page breaks between lines. */
	text(text: string, style: Style = BODY, opts: { indent?: number; width?: number } = {}) {
		const indent = opts.indent ?? 0;
		const lines = this.t.wrap(text, opts.width ?? this.width - indent, style);
		const lh = style.size * LINE;
		for (const line of lines) {
			this.ensure(lh);
			this.y -= lh;
			this.t.draw(this.page, line, this.left + indent, this.y + lh - style.size, style);
		}
	}

	heading(text: string, opts: { size?: number; keepWith?: number } = {}) {
		const size = opts.size ?? 12;
		this.ensure(size * 1.6 + (opts.keepWith ?? 40));
		this.gap(size * 0.6);
		this.y -= size * 1.2;
		this.t.draw(this.page, text, this.left, this.y + size * 0.25, { size, bold: true, color: BRAND });
		this.page.drawLine({
			start: { x: this.left, y: this.y - 2 },
			end: { x: this.left + this.width, y: this.y - 2 },
			thickness: 0.6,
			color: RULE
		});
		this.y -= 8;
	}

	/** Label–value pairs in `columns` columns; values wrap. */
	fields(pairs: Array<[string, string]>, columns = 2) {
		const colW = this.width / columns;
		const labelW = Math.min(95, colW * 0.4);
		const label: Style = { size: 8, color: MUTED };
		const lh = BODY.size * LINE;
		for (let i = 0; i < pairs.length; i += columns) {
			const row = pairs.slice(i, i + columns).map(([k, v]) => ({ k, lines: this.t.wrap(v || '—', colW - labelW - 8, BODY) }));
			const h = Math.max(...row.map((c) => c.lines.length)) * lh + 3;
			this.ensure(h);
			row.forEach((c, j) => {
				const x = this.left + j * colW;
				this.t.draw(this.page, c.k, x, this.y - BODY.size, label);
				c.lines.forEach((line, n) => this.t.draw(this.page, line, x + labelW, this.y - BODY.size - n * lh, BODY));
			});
			this.y -= h;
		}
	}

	/** A table that repeats its header on every page it runs onto. */
	table(columns: Column[], rows: Cell[][], opts: { size?: number } = {}) {
		const size = opts.size ?? 7.5;
		const pad = 3;
		const lh = size * LINE;
		const total = columns.reduce((s, c) => s + c.weight, 0);
		const widths = columns.map((c) => (c.weight / total) * this.width);
		const xs = widths.map((_, i) => this.left + widths.slice(0, i).reduce((s, w) => s + w, 0));
		const head: Style = { size, bold: true, color: WHITE };
		const headLines = columns.map((c, i) => this.t.wrap(c.title, widths[i] - 2 * pad, head));
		const headH = Math.max(...headLines.map((l) => l.length)) * lh + 2 * pad;

		const drawHeader = () => {
			this.page.drawRectangle({ x: this.left, y: this.y - headH, width: this.width, height: headH, color: BRAND });
			headLines.forEach((lines, i) =>
				lines.forEach((line, n) => this.t.draw(this.page, line, xs[i] + pad, this.y - pad - size - n * lh + 1, head))
			);
			this.y -= headH;
		};

		// Lay every row out first, so the header never stands alone at the foot of a page.
		const maxLines = Math.max(1, Math.floor((this.fullHeight - headH - 2 * pad) / lh));
		const laid = rows.map((row) => {
			const lines = row.map((cell, i) => {
				const style: Style = { size, bold: cell.bold, color: INK };
				const room = widths[i] - 2 * pad - (cell.severity ? size + 3 : 0);
				const l = this.t.wrap(cell.text, Math.max(room, size), style);
				// A row never runs past a page: cap its lines to what a fresh page holds.
				return l.length > maxLines ? [...l.slice(0, maxLines - 1), `${l[maxLines - 1]} …`] : l;
			});
			return { lines, h: Math.max(1, ...lines.map((l) => l.length)) * lh + 2 * pad };
		});
		this.ensure(headH + (laid[0]?.h ?? lh + 2 * pad));
		drawHeader();
		rows.forEach((row, r) => {
			const { lines: clipped, h } = laid[r];
			if (this.y - h < this.bottom) {
				this.newPage();
				drawHeader();
			}
			if (r % 2 === 1) this.page.drawRectangle({ x: this.left, y: this.y - h, width: this.width, height: h, color: SHADE });
			row.forEach((cell, i) => {
				let x = xs[i] + pad;
				if (cell.severity) {
					drawSeverityShape(this.page, cell.severity, x + size / 2, this.y - pad - size / 2, size / 2.4, INK);
					x += size + 3;
				}
				clipped[i].forEach((line, n) =>
					this.t.draw(this.page, line, x, this.y - pad - size - n * lh + 1, { size, bold: cell.bold, color: INK })
				);
			});
			this.page.drawLine({
				start: { x: this.left, y: this.y - h },
				end: { x: this.left + this.width, y: this.y - h },
				thickness: 0.4,
				color: RULE
			});
			this.y -= h;
		});
		this.gap(6);
	}

	/** Bulleted list; each item wraps under its own bullet. */
	bullets(items: string[], style: Style = BODY) {
		const lh = style.size * LINE;
		for (const item of items) {
			const lines = this.t.wrap(item, this.width - 12, style);
			lines.forEach((line, n) => {
				this.ensure(lh);
				this.y -= lh;
				if (n === 0) this.page.drawCircle({ x: this.left + 4, y: this.y + lh - style.size * 0.65, size: 1.4, color: style.color ?? INK });
				this.t.draw(this.page, line, this.left + 12, this.y + lh - style.size, style);
			});
			this.y -= 1.5;
		}
	}
}

function drawHeader(w: PackWriter) {
	const { input, t } = w;
	const j = input.job;
	w.newPage();
	t.draw(w.page, input.organisation, w.left, w.y - 9, { size: 9, color: MUTED });
	const label = 'Installation job pack';
	t.draw(w.page, label, w.left + w.width - t.width(label, { size: 9 }), w.y - 9, { size: 9, color: MUTED });
	w.gap(14);
	for (const line of t.wrap(`${j.reference} · ${j.title}`, w.width, { size: 17, bold: true })) {
		w.y -= 21;
		t.draw(w.page, line, w.left, w.y + 4, { size: 17, bold: true, color: INK });
	}
	w.gap(8);
	const outage = j.outageStart || j.outageEnd ? `${formatWhen(j.outageStart)} to ${formatWhen(j.outageEnd)}` : 'not planned';
	w.fields([
		['Survey', j.survey],
		['Site', j.site],
		['Revision', `Revision ${j.revision} (approved)`],
		['Status', j.status],
		['Assignee', j.assignee ?? 'not assigned'],
		['Due', formatWhen(j.due)],
		['Outage window', outage],
		['Points', String(input.points.length)]
	]);
	w.gap(6);

	if (j.lockoutRequired) {
		const title = 'LOCKOUT REQUIRED';
		const sub =
			'Stop, isolate and lock out the machine before any seat is prepared, drilled or tapped. Each person fits their own lock; prove the machine dead before work starts.';
		const subLines = t.wrap(sub, w.width - 20, { size: 8.5 });
		const h = 30 + subLines.length * 11;
		w.ensure(h);
		w.page.drawRectangle({ x: w.left, y: w.y - h, width: w.width, height: h, color: DANGER });
		t.draw(w.page, title, w.left + 10, w.y - 20, { size: 14, bold: true, color: WHITE });
		subLines.forEach((line, n) => t.draw(w.page, line, w.left + 10, w.y - 34 - n * 11, { size: 8.5, color: WHITE }));
		w.y -= h + 6;
	} else {
		const note =
			'Lockout: no drilling, tapping or grinding is planned for this job. Follow the checklist and the site rules for isolation before touching the machine.';
		const lines = t.wrap(note, w.width - 20, { size: 8.5 });
		const h = 10 + lines.length * 11;
		w.ensure(h);
		w.page.drawRectangle({ x: w.left, y: w.y - h, width: w.width, height: h, color: SAFETY_BAND, borderColor: RULE, borderWidth: 0.5 });
		lines.forEach((line, n) => t.draw(w.page, line, w.left + 10, w.y - 14 - n * 11, { size: 8.5, bold: n === 0, color: INK }));
		w.y -= h + 6;
	}
	w.text(`Generated ${formatWhen(j.generatedAt)} from the approved revision ${j.revision}. Paper: ${input.paper}.`, {
		size: 7.5,
		color: MUTED
	});
}

async function embedBoardImage(w: PackWriter, board: JobPackBoardImage): Promise<PDFImage | null> {
	if (!board.image) return null;
	try {
		return board.image.mime === 'image/png' ? await w.doc.embedPng(board.image.bytes) : await w.doc.embedJpg(board.image.bytes);
	} catch {
		return null;
	}
}

async function drawBoard(w: PackWriter, board: JobPackBoardImage) {
	const { t } = w;
	const bw = board.width > 0 ? board.width : 1000;
	const bh = board.height > 0 ? board.height : 750;
	const legendH = 18;
	const maxH = Math.min(w.fullHeight * 0.62, 440);
	const scale = Math.min(w.width / bw, maxH / bh);
	const iw = bw * scale;
	const ih = bh * scale;
	w.heading(`Board: ${board.title}`, { keepWith: ih + legendH });
	w.ensure(ih + legendH);
	const x0 = w.left + (w.width - iw) / 2;
	const top = w.y;
	const page = w.page;
	const px = (x: number) => x0 + x * scale;
	const py = (y: number) => top - y * scale;

	const image = await embedBoardImage(w, board);
	if (image) page.drawImage(image, { x: x0, y: top - ih, width: iw, height: ih });
	else {
		page.drawRectangle({ x: x0, y: top - ih, width: iw, height: ih, color: SHADE });
		const note = board.image
			? 'The board photo could not be read; points drawn on a plain frame.'
			: 'No photo on this board; points drawn on a plain frame.';
		t.draw(page, note, x0 + 8, top - 14, { size: 8, color: MUTED });
	}

	for (const zone of board.zones) {
		if (zone.polygon.length < 3) continue;
		const d = zone.polygon.map(([x, y], i) => `${i ? 'L' : 'M'} ${x} ${y}`).join(' ') + ' Z';
		page.drawSvgPath(d, {
			x: x0,
			y: top,
			scale,
			color: KEEP_OUT,
			opacity: 0.16,
			borderColor: KEEP_OUT,
			borderWidth: 1.2 / scale,
			borderDashArray: [4 / scale, 3 / scale]
		});
		const [lx, ly] = zone.polygon[0];
		const label = zone.label || zone.kind;
		if (label) {
			const style: Style = { size: 7, bold: true, color: KEEP_OUT };
			const tx = Math.min(px(lx) + 3, x0 + iw - t.width(label, style) - 4);
			const ty = Math.max(py(ly) - 10, top - ih + 4);
			page.drawRectangle({ x: tx - 1.5, y: ty - 2, width: t.width(label, style) + 3, height: 9.5, color: WHITE, opacity: 0.85 });
			t.draw(page, label, tx, ty, style);
		}
	}

	for (const route of board.routes) {
		const v = route.vertices;
		for (const [width, color] of [
			[3.6, WHITE],
			[1.8, BRAND]
		] as const) {
			for (let i = 1; i < v.length; i++) {
				page.drawLine({
					start: { x: px(v[i - 1][0]), y: py(v[i - 1][1]) },
					end: { x: px(v[i][0]), y: py(v[i][1]) },
					thickness: width,
					color
				});
			}
		}
	}

	const r = 7.5;
	for (const p of board.points) {
		const cx = Math.min(Math.max(px(p.x), x0 + r), x0 + iw - r);
		const cy = Math.min(Math.max(py(p.y), top - ih + r), top - r);
		drawSeverityShape(page, p.worst, cx, cy, r);
		const label = String(p.number);
		const style: Style = { size: label.length > 2 ? 6 : 7.5, bold: true, color: p.worst === 'warn' ? INK : WHITE };
		const dy = SEVERITY_META[p.worst].shape === 'triangle' ? -r * 0.5 : -style.size * 0.35;
		t.draw(page, label, cx - t.width(label, style) / 2, cy + dy, style);
	}
	page.drawRectangle({ x: x0, y: top - ih, width: iw, height: ih, borderColor: INK, borderWidth: 0.6 });
	w.y = top - ih;

	// Legend: shapes and words, never colour alone.
	const ly = w.y - 11;
	let lx = w.left;
	for (const s of ['pass', 'warn', 'fail'] as const) {
		drawSeverityShape(page, s, lx + 4, ly + 2.5, 3.6, INK);
		lx += 11 + t.draw(page, SEVERITY_META[s].word, lx + 11, ly, { size: 7.5, color: INK }) + 10;
	}
	page.drawLine({ start: { x: lx, y: ly + 2.5 }, end: { x: lx + 16, y: ly + 2.5 }, thickness: 1.8, color: BRAND });
	lx += 20 + t.draw(page, 'cable route', lx + 20, ly, { size: 7.5, color: INK }) + 10;
	page.drawRectangle({ x: lx, y: ly - 1, width: 12, height: 7, color: KEEP_OUT, opacity: 0.16, borderColor: KEEP_OUT, borderWidth: 0.8 });
	lx += 16 + t.draw(page, 'keep-out zone', lx + 16, ly, { size: 7.5, color: INK }) + 10;
	t.draw(page, 'Numbers match the table of points.', lx, ly, { size: 7.5, color: MUTED });
	w.y -= legendH;
}

function worstOf(p: JobPackPoint): Severity {
	return worstSeverity(p.findings);
}

function mountingLabel(p: JobPackPoint) {
	const m = p.preparation.mounting;
	return m ? MOUNTING_LABEL[m] : 'not chosen';
}

function summaryOf(p: JobPackPoint) {
	return preparationSummary(p.preparation, { material: isMaterial(p.material) ? p.material : null });
}

function cableOf(p: JobPackPoint) {
	const len = p.cableLengthM === null ? 'no route' : `${fmt(p.cableLengthM, 1)} m`;
	return p.conductor ? `${len}, ${p.conductor}` : len;
}

function drawPointsTable(w: PackWriter) {
	w.heading('Points', { keepWith: 60 });
	if (w.input.points.length === 0) {
		w.text('No points in this job.');
		return;
	}
	w.table(
		[
			{ title: 'No.', weight: 4 },
			{ title: 'Point', weight: 9 },
			{ title: 'Machine, component', weight: 12 },
			{ title: 'Direction', weight: 7 },
			{ title: 'Mounting', weight: 8 },
			{ title: 'Preparation', weight: 21.2 },
			{ title: 'Torque limit', weight: 6 },
			{ title: 'Cable', weight: 10 },
			{ title: 'Supply point', weight: 9 },
			{ title: 'Worst finding', weight: 8 }
		],
		w.input.points.map((p) => {
			const worst = worstOf(p);
			return [
				{ text: String(p.number), bold: true },
				{ text: p.label, bold: true },
				{ text: [p.machine, p.component].filter(Boolean).join(', ') },
				{ text: p.direction ?? '—' },
				{ text: mountingLabel(p) },
				{ text: summaryOf(p) },
				{ text: p.torqueLimitNm === null ? '—' : `${fmt(p.torqueLimitNm, 1)} N·m` },
				{ text: cableOf(p) },
				{ text: p.supplyPoint ?? '—' },
				{ text: p.findings.length ? SEVERITY_META[worst].word : 'none', severity: p.findings.length ? worst : undefined }
			];
		})
	);
}

function preparationPairs(p: JobPackPoint): Array<[string, string]> {
	const prep = p.preparation;
	const mm = (v: number | null, digits = 1) => (v === null ? null : `${fmt(v, digits)} mm`);
	const pairs: Array<[string, string | null]> = [
		['Mounting', mountingLabel(p)],
		['Housing material', isMaterial(p.material) ? MATERIAL_LABEL[p.material] : p.material],
		['Spot face / flat seat', prep.spotFaceDiameterMm === null ? null : `Ø${fmt(prep.spotFaceDiameterMm)} mm`],
		['Thread', prep.thread],
		['Tap drill', prep.tapDrillMm === null ? null : `Ø${prep.tapDrillMm.toFixed(1)} mm`],
		['Hole depth', mm(prep.holeDepthMm)],
		['Full-thread depth', mm(prep.threadDepthMm)],
		[
			'Thread engagement',
			prep.mounting === 'stud'
				? prep.threadEngagementMm === null
					? 'material not recorded: confirm before drilling'
					: mm(prep.threadEngagementMm)
				: null
		],
		['Pad', prep.pad],
		['Adhesive', prep.adhesive],
		['Cure wait', prep.cureWaitMin === null ? null : `at least ${fmt(prep.cureWaitMin, 0)} min before loading the pad`],
		['Torque limit', p.torqueLimitNm === null ? null : `${fmt(p.torqueLimitNm, 1)} N·m`],
		['Direction', p.direction],
		['Cable', cableOf(p)],
		['Supply point', p.supplyPoint],
		['Notes', p.notes?.trim() ? p.notes : null]
	];
	return pairs.filter((x): x is [string, string] => x[1] !== null && x[1] !== '');
}

function drawPointDetail(w: PackWriter, p: JobPackPoint) {
	const { t } = w;
	w.ensure(90);
	w.gap(8);
	const worst = worstOf(p);
	const title = `${p.number} · ${p.label}`;
	const size = 11;
	w.y -= size * 1.3;
	drawSeverityShape(w.page, worst, w.left + 6, w.y + size * 0.3, 5.5, INK);
	const tw = t.draw(w.page, title, w.left + 16, w.y, { size, bold: true, color: INK });
	t.draw(w.page, `  ${[p.machine, p.component].filter(Boolean).join(', ')}`, w.left + 16 + tw, w.y, { size: 9, color: MUTED });
	w.gap(6);
	w.fields(preparationPairs(p), 2);

	if (p.checklist.length) {
		w.gap(4);
		w.ensure(9 * LINE + 3 * 8.5 * LINE);
		w.text('Checklist', { size: 9, bold: true, color: BRAND });
		const style: Style = { size: 8.5, color: INK };
		const lh = style.size * LINE;
		let phase: ChecklistPhase | null = null;
		for (const step of p.checklist) {
			if (step.phase !== phase) {
				phase = step.phase;
				w.ensure(lh * 2);
				w.y -= lh;
				t.draw(w.page, PHASE_LABEL[phase] ?? phase, w.left + 4, w.y + 2, { size: 7.5, bold: true, color: MUTED });
			}
			const text = step.safety ? `SAFETY: ${step.text}` : step.text;
			const lines = t.wrap(text, w.width - 26, style);
			const h = lines.length * lh + 2;
			w.ensure(h);
			if (step.safety) w.page.drawRectangle({ x: w.left, y: w.y - h, width: w.width, height: h, color: SAFETY_BAND });
			w.page.drawRectangle({ x: w.left + 6, y: w.y - lh + 1, width: 7, height: 7, borderColor: INK, borderWidth: 0.7 });
			lines.forEach((line, n) =>
				t.draw(w.page, line, w.left + 20, w.y - style.size - n * lh + 0.5, { ...style, bold: step.safety && n === 0 })
			);
			w.y -= h;
		}
	} else {
		w.text('No checklist: the mounting method is not chosen. Decide it with the engineer before work starts.', {
			size: 8.5,
			color: DANGER
		});
	}

	w.gap(4);
	w.ensure(9 * LINE + 2 * 8.5 * LINE);
	w.text('Findings', { size: 9, bold: true, color: BRAND });
	if (!p.findings.length) {
		w.text('No findings recorded.', { size: 8.5, color: MUTED });
	} else {
		const style: Style = { size: 8.5, color: INK };
		const lh = style.size * LINE;
		const order = { fail: 0, warn: 1, pass: 2 } as const;
		for (const f of [...p.findings].sort((a, b) => order[a.severity] - order[b.severity])) {
			const word = SEVERITY_META[f.severity].word;
			const lines = t.wrap(`${word}: ${f.message}`, w.width - 18, style);
			w.ensure(lines.length * lh + 1);
			drawSeverityShape(w.page, f.severity, w.left + 7, w.y - style.size * 0.62, 3.4, INK);
			lines.forEach((line, n) => t.draw(w.page, line, w.left + 16, w.y - style.size - n * lh + 0.5, style));
			w.y -= lines.length * lh + 1;
		}
	}
	w.page.drawLine({
		start: { x: w.left, y: w.y - 4 },
		end: { x: w.left + w.width, y: w.y - 4 },
		thickness: 0.4,
		color: RULE
	});
	w.gap(6);
}

function drawMaterials(w: PackWriter) {
	w.heading('Bill of materials', { keepWith: 60 });
	const margin = `${fmt(w.input.cableMargin * 100, 1)} %`;
	w.text(`Summed over the job's points. Cable lengths include a ${margin} margin over the measured route length.`, {
		size: 8.5,
		color: MUTED
	});
	w.gap(3);
	if (!w.input.materials.length) {
		w.text('Nothing to order.');
		return;
	}
	w.table(
		[
			{ title: 'Item', weight: 34 },
			{ title: 'Quantity', weight: 8 },
			{ title: 'Unit', weight: 6 },
			{ title: 'Note', weight: 52 }
		],
		w.input.materials.map((m) => [{ text: m.item, bold: true }, { text: fmt(m.quantity, 2) }, { text: m.unit }, { text: m.note ?? '' }]),
		{ size: 8 }
	);
}

function drawCautions(w: PackWriter) {
	w.heading('Safety', { keepWith: 80 });
	w.text(
		'The cautions below do not make the work safe by themselves. Local codes, site rules, permits and licensed practice come first; where they differ from this pack, they apply.',
		{ size: 9, bold: true, color: DANGER }
	);
	w.gap(3);
	w.bullets(w.input.cautions.map((c) => c.text));
}

function drawSignOff(w: PackWriter) {
	const rowH = 28;
	const headH = 14;
	const block = headH + 2 * rowH + 36;
	w.heading('Sign-off', { keepWith: block });
	w.ensure(block);
	const { t, page } = w;
	const cols: Array<[string, number]> = [
		['', 0.16],
		['Name', 0.3],
		['Signature', 0.34],
		['Date', 0.2]
	];
	let x = w.left;
	const xs = cols.map(([, f]) => {
		const at = x;
		x += f * w.width;
		return at;
	});
	cols.forEach(([title], i) => t.draw(page, title, xs[i] + 4, w.y - 10, { size: 8, bold: true, color: MUTED }));
	w.y -= headH;
	for (const role of ['Installed by', 'Checked by']) {
		t.draw(page, role, xs[0] + 4, w.y - rowH + 8, { size: 9, bold: true, color: INK });
		for (let i = 1; i < cols.length; i++) {
			page.drawLine({
				start: { x: xs[i] + 4, y: w.y - rowH + 6 },
				end: { x: xs[i] + cols[i][1] * w.width - 8, y: w.y - rowH + 6 },
				thickness: 0.7,
				color: INK
			});
		}
		w.y -= rowH;
	}
	w.gap(10);
	w.text(
		'By signing, the installer confirms the work was done as this pack plans it or that every deviation is recorded with its reason in the as-installed record; the checker confirms the record was reviewed.',
		{ size: 8, color: MUTED }
	);
}

function drawFooters(w: PackWriter) {
	const total = w.pages.length;
	const style: Style = { size: 7.5, color: MUTED };
	w.pages.forEach((page, i) => {
		const y = MARGIN - 4;
		page.drawLine({ start: { x: w.left, y: y + 12 }, end: { x: w.left + w.width, y: y + 12 }, thickness: 0.4, color: RULE });
		w.t.draw(page, `${w.input.organisation} · ${w.input.job.reference}`, w.left, y, style);
		const label = `page ${i + 1} of ${total}`;
		w.t.draw(page, label, w.left + w.width - w.t.width(label, style), y, style);
	});
}

/** Lets other requests and the live board run between the pieces of a long pack. */
const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/**
 * Renders the job pack to PDF bytes (A4 or Letter as `input.paper` says). The work is CPU-bound
 * (text shaping, compression); it yields to the event loop after each board and point so a large
 * pack never holds up the server for long.
 */
export async function renderJobPack(input: JobPackInput): Promise<Uint8Array> {
	const doc = await PDFDocument.create();
	doc.registerFontkit(fontkit);
	const t = await Typesetter.embed(doc);
	const j = input.job;
	doc.setTitle(`${j.reference} · ${j.title}`);
	doc.setAuthor(input.organisation);
	doc.setSubject(`Installation job pack, ${j.survey}, revision ${j.revision}`);
	doc.setCreator('Spotface');
	doc.setProducer('Spotface (pdf-lib)');
	const generated = new Date(j.generatedAt);
	if (!Number.isNaN(generated.getTime())) {
		doc.setCreationDate(generated);
		doc.setModificationDate(generated);
	}

	const w = new PackWriter(doc, t, input);
	drawHeader(w);
	for (const board of input.boards) {
		await drawBoard(w, board);
		await yieldToEventLoop();
	}
	drawPointsTable(w);
	if (input.points.length) {
		w.heading('Preparation and checklist per point', { keepWith: 120 });
		for (const p of input.points) {
			drawPointDetail(w, p);
			await yieldToEventLoop();
		}
	}
	drawMaterials(w);
	w.heading('Tools', { keepWith: 40 });
	if (input.tools.length) w.bullets(input.tools);
	else w.text('No tools listed.');
	drawCautions(w);
	drawSignOff(w);
	drawFooters(w);
	return doc.save();
}
