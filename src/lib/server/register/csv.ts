// Machine lists as CSV: plants keep them in spreadsheets. Import validates every row with the
// same schema as the form and reports each problem by spreadsheet row and column; nothing is
// written unless the whole file is valid, or the user asks to import only the good rows.
import Papa from 'papaparse';
import { sql } from 'kysely';
import type { DB } from '../db/index';
import { machineSchema, type MachineInput } from '../../schemas/register';
import type { MachineDto } from '../db/machines';

export const CSV_COLUMNS = [
	'site',
	'area',
	'name',
	'tag',
	'kind',
	'speed_rpm',
	'speed_mode',
	'speed_signal',
	'power_kw',
	'foundation',
	'hazardous_area',
	'hazardous_zone_note',
	'notes'
] as const;
export type CsvColumn = (typeof CSV_COLUMNS)[number];

const FIELD_OF: Record<Exclude<CsvColumn, 'site' | 'area'>, keyof MachineInput> = {
	name: 'name',
	tag: 'tag',
	kind: 'kind',
	speed_rpm: 'speedRpm',
	speed_mode: 'speedMode',
	speed_signal: 'speedSignal',
	power_kw: 'powerKw',
	foundation: 'foundation',
	hazardous_area: 'hazardousArea',
	hazardous_zone_note: 'hazardousZoneNote',
	notes: 'notes'
};
const COLUMN_OF = Object.fromEntries(Object.entries(FIELD_OF).map(([c, f]) => [f, c])) as Record<string, CsvColumn>;

// Headers people actually write in their spreadsheets, after normalising (lower case, words
// joined by "_", units in brackets dropped).
const ALIASES: Record<string, CsvColumn> = {
	site: 'site',
	site_name: 'site',
	plant: 'site',
	area: 'area',
	area_name: 'area',
	location: 'area',
	name: 'name',
	machine: 'name',
	machine_name: 'name',
	description: 'name',
	tag: 'tag',
	tag_no: 'tag',
	tag_number: 'tag',
	asset_tag: 'tag',
	kind: 'kind',
	type: 'kind',
	machine_type: 'kind',
	speed_rpm: 'speed_rpm',
	speed: 'speed_rpm',
	rpm: 'speed_rpm',
	nominal_speed: 'speed_rpm',
	nominal_speed_rpm: 'speed_rpm',
	speed_mode: 'speed_mode',
	speed_type: 'speed_mode',
	speed_signal: 'speed_signal',
	speed_signal_available: 'speed_signal',
	tacho: 'speed_signal',
	power_kw: 'power_kw',
	power: 'power_kw',
	kw: 'power_kw',
	rated_power: 'power_kw',
	foundation: 'foundation',
	hazardous_area: 'hazardous_area',
	hazardous: 'hazardous_area',
	ex_area: 'hazardous_area',
	atex: 'hazardous_area',
	hazardous_zone_note: 'hazardous_zone_note',
	zone: 'hazardous_zone_note',
	zone_note: 'hazardous_zone_note',
	hazardous_zone: 'hazardous_zone_note',
	notes: 'notes',
	note: 'notes',
	comments: 'notes',
	remarks: 'notes'
};

export function normaliseHeader(h: string): string {
	const plain = h
		.replace(/^\uFEFF/, '')
		.trim()
		.toLowerCase()
		.replace(/\((rpm|kw|r\/min|1\/min)\)/g, (_, u: string) => (u === 'kw' ? ' kw' : ' rpm'))
		.replace(/\([^)]*\)/g, ' ')
		.replace(/[^a-z0-9]+/g, '_')
		.replace(/^_+|_+$/g, '');
	return plain;
}

export function columnFor(header: string): CsvColumn | null {
	const n = normaliseHeader(header);
	return ALIASES[n] ?? ((CSV_COLUMNS as readonly string[]).includes(n) ? (n as CsvColumn) : null);
}

export const MAX_CSV_BYTES = 5 * 1024 * 1024;
export const MAX_CSV_ROWS = 20_000;

export interface CellError {
	column: string;
	message: string;
}
export interface RowReport {
	/** the row number as a spreadsheet shows it (the header is row 1) */
	row: number;
	values: Partial<Record<CsvColumn, string>>;
	errors: CellError[];
}
export interface ImportReport {
	fileErrors: string[];
	delimiter: string;
	columns: CsvColumn[];
	ignoredColumns: string[];
	rows: RowReport[];
	validCount: number;
	errorCount: number;
	/** areas named in the file that do not exist yet; they are created on import */
	newAreas: Array<{ site: string; area: string }>;
}

interface PlannedRow {
	row: number;
	siteId: string;
	areaName: string | null;
	input: Omit<MachineInput, 'areaId'>;
}

/** The delimiter of the header line: the most frequent of ; , tab | outside quotes. */
export function guessDelimiter(text: string): string {
	const firstLine = text.split(/\r?\n/, 1)[0] ?? '';
	const counts: Record<string, number> = { ',': 0, ';': 0, '\t': 0, '|': 0 };
	let quoted = false;
	for (const ch of firstLine) {
		if (ch === '"') quoted = !quoted;
		else if (!quoted && ch in counts) counts[ch]++;
	}
	const best = Object.entries(counts).sort((a, b) => b[1] - a[1])[0];
	return best && best[1] > 0 ? best[0] : ',';
}

/** Undo the export's guard against spreadsheet formulas ("'=..." back to "=..."). */
function unguard(v: string) {
	return /^'[=+\-@\t\r]/.test(v) ? v.slice(1) : v;
}

export function decode(bytes: Uint8Array): string {
	// UTF-8 with or without BOM; a file that is not valid UTF-8 is read as Windows-1252, which is
	// what older spreadsheet programs save.
	try {
		return new TextDecoder('utf-8', { fatal: true }).decode(bytes).replace(/^\uFEFF/, '');
	} catch {
		return new TextDecoder('windows-1252').decode(bytes);
	}
}

/** Parse and check a machine list. Reads the sites, areas and tags of the organisation. */
export async function validateMachineCsv(db: DB, organisationId: string, text: string, opts: { defaultSiteId?: string | null } = {}) {
	const report: ImportReport = {
		fileErrors: [],
		delimiter: ',',
		columns: [],
		ignoredColumns: [],
		rows: [],
		validCount: 0,
		errorCount: 0,
		newAreas: []
	};
	const planned: PlannedRow[] = [];
	text = text.replace(/^\uFEFF/, '');
	if (text.length > MAX_CSV_BYTES) {
		report.fileErrors.push(`The file is larger than ${MAX_CSV_BYTES / 1024 / 1024} MB. Split it into smaller files.`);
		return { report, planned };
	}
	if (text.trim() === '') {
		report.fileErrors.push(
			'The file is empty. Export the machine list from your spreadsheet as CSV with a header row (name, kind, …) and one machine per row.'
		);
		return { report, planned };
	}
	report.delimiter = guessDelimiter(text);
	const parsed = Papa.parse<string[]>(text, { delimiter: report.delimiter, skipEmptyLines: false });
	const data = parsed.data;
	const header = (data[0] ?? []).map((h) => String(h));
	const colIndex = new Map<CsvColumn, number>();
	header.forEach((h, i) => {
		const c = columnFor(h);
		if (c && !colIndex.has(c)) colIndex.set(c, i);
		else if (h.trim()) report.ignoredColumns.push(h.trim());
	});
	report.columns = [...colIndex.keys()];
	for (const required of ['name', 'kind'] as const) {
		if (!colIndex.has(required))
			report.fileErrors.push(`The header row has no "${required}" column. Columns Spotface reads: ${CSV_COLUMNS.join(', ')}.`);
	}
	const sites = await db.selectFrom('site').select(['id', 'name', 'archived_at']).where('organisation_id', '=', organisationId).execute();
	const defaultSite = opts.defaultSiteId ? sites.find((s) => s.id === opts.defaultSiteId && !s.archived_at) : undefined;
	if (opts.defaultSiteId && !defaultSite) report.fileErrors.push('The chosen site does not exist or is archived.');
	if (!colIndex.has('site') && !defaultSite) report.fileErrors.push('Choose the site to import into, or add a "site" column.');
	const body = data.slice(1);
	if (!report.fileErrors.length && body.every((r) => r.every((c) => String(c).trim() === ''))) {
		report.fileErrors.push('The file has a header row but no machines. Add one machine per row under the header.');
	}
	if (body.length > MAX_CSV_ROWS) report.fileErrors.push(`The file has ${body.length} rows; import at most ${MAX_CSV_ROWS} at a time.`);
	if (report.fileErrors.length) return { report, planned };

	const liveSites = new Map(sites.filter((s) => !s.archived_at).map((s) => [s.name.trim().toLowerCase(), s]));
	const areas = await db
		.selectFrom('area')
		.select(['id', 'site_id', 'name'])
		.where('organisation_id', '=', organisationId)
		.where('archived_at', 'is', null)
		.execute();
	const areaKey = (siteId: string, name: string) => `${siteId}\u0000${name.trim().toLowerCase()}`;
	const areaIds = new Map(areas.map((a) => [areaKey(a.site_id, a.name), a.id]));
	const newAreas = new Map<string, { site: string; area: string }>();

	const parseErrors = new Map<number, string[]>();
	for (const e of parsed.errors) {
		if (e.row == null) continue;
		const list = parseErrors.get(e.row) ?? [];
		list.push(e.code === 'MissingQuotes' ? 'A quoted cell is not closed (a " is missing).' : e.message);
		parseErrors.set(e.row, list);
	}

	const tagRows = new Map<string, number>();
	body.forEach((cells, i) => {
		const rowNumber = i + 2;
		if (cells.every((c) => String(c).trim() === '')) return;
		const values: Partial<Record<CsvColumn, string>> = {};
		for (const [c, idx] of colIndex) values[c] = unguard(String(cells[idx] ?? '').trim());
		const errors: CellError[] = [];
		for (const m of parseErrors.get(i + 1) ?? []) errors.push({ column: '(row)', message: m });
		if (cells.length > header.length && cells.slice(header.length).some((c) => String(c).trim() !== '')) {
			errors.push({
				column: '(row)',
				message: `The row has ${cells.length} cells but the header has ${header.length}: is a "${report.delimiter}" inside a cell without quotes?`
			});
		}

		let siteId: string | null = null;
		let siteName = '';
		if (values.site) {
			const s = liveSites.get(values.site.toLowerCase());
			if (s) {
				siteId = s.id;
				siteName = s.name;
			} else
				errors.push({ column: 'site', message: `No live site is named "${values.site}". Register the site first, or correct the name.` });
		} else if (defaultSite) {
			siteId = defaultSite.id;
			siteName = defaultSite.name;
		} else errors.push({ column: 'site', message: 'Enter the site, or choose a site to import into.' });

		const raw: Record<string, unknown> = { siteId: siteId ?? '00000000-0000-0000-0000-000000000000', areaId: null };
		for (const [col, field] of Object.entries(FIELD_OF)) raw[field] = values[col as CsvColumn];
		const result = machineSchema.safeParse(raw);
		if (!result.success) {
			for (const issue of result.error.issues) {
				const field = String(issue.path[0] ?? '');
				errors.push({ column: COLUMN_OF[field] ?? field, message: issue.message });
			}
		}
		const tag = values.tag?.trim();
		if (tag) {
			const key = tag.toLowerCase();
			const first = tagRows.get(key);
			if (first) errors.push({ column: 'tag', message: `The tag "${tag}" is also on row ${first}: a tag names one machine.` });
			else tagRows.set(key, rowNumber);
		}
		const areaName = values.area?.trim() || null;
		if (areaName && areaName.length > 120) errors.push({ column: 'area', message: 'An area name has at most 120 characters.' });
		report.rows.push({ row: rowNumber, values, errors });
		if (!errors.length && result.success && siteId) {
			if (areaName && !areaIds.has(areaKey(siteId, areaName))) newAreas.set(areaKey(siteId, areaName), { site: siteName, area: areaName });
			const { areaId: _unused, ...input } = result.data;
			void _unused;
			planned.push({ row: rowNumber, siteId, areaName, input });
		}
	});

	// Tags already on live machines.
	const tags = [...tagRows.keys()];
	if (tags.length) {
		const taken = new Set<string>();
		for (let i = 0; i < tags.length; i += 1000) {
			const rows = await db
				.selectFrom('machine')
				.select(sql<string>`lower(tag)`.as('t'))
				.where('organisation_id', '=', organisationId)
				.where('archived_at', 'is', null)
				.where(sql<string>`lower(tag)`, 'in', tags.slice(i, i + 1000))
				.execute();
			for (const r of rows) taken.add(r.t);
		}
		for (const r of report.rows) {
			const t = r.values.tag?.trim().toLowerCase();
			if (t && taken.has(t) && tagRows.get(t) === r.row) {
				r.errors.push({ column: 'tag', message: `A machine with the tag "${r.values.tag}" is already registered.` });
			}
		}
	}
	const bad = new Set(report.rows.filter((r) => r.errors.length).map((r) => r.row));
	const keep = planned.filter((p) => !bad.has(p.row));
	planned.length = 0;
	planned.push(...keep);
	report.errorCount = bad.size;
	report.validCount = report.rows.length - bad.size;
	// Only areas needed by rows that will be imported.
	const needed = new Set(planned.filter((p) => p.areaName).map((p) => areaKey(p.siteId, p.areaName!)));
	report.newAreas = [...newAreas.entries()].filter(([k]) => needed.has(k)).map(([, v]) => v);
	return { report, planned, areaIds, areaKey };
}

export class ImportRefused extends Error {
	constructor(
		message: string,
		readonly report: ImportReport
	) {
		super(message);
	}
}

/**
 * Import a machine list. mode 'all' writes nothing unless every row is valid; 'valid' imports
 * the good rows and leaves the others out. One transaction either way.
 */
export async function importMachineCsv(
	db: DB,
	organisationId: string,
	text: string,
	opts: { defaultSiteId?: string | null; mode: 'all' | 'valid' }
) {
	const v = await validateMachineCsv(db, organisationId, text, opts);
	const { report, planned } = v;
	if (report.fileErrors.length) throw new ImportRefused(report.fileErrors[0]!, report);
	if (opts.mode === 'all' && report.errorCount > 0) {
		throw new ImportRefused(
			`${report.errorCount} of ${report.rows.length} rows have problems: nothing was imported. Correct them, or import only the ${report.validCount} good rows.`,
			report
		);
	}
	if (!planned.length) throw new ImportRefused('No row is valid: nothing to import.', report);
	const ids = await db.transaction().execute(async (trx) => {
		const areaIds = new Map(v.areaIds);
		const out: string[] = [];
		for (const p of planned) {
			let areaId: string | null = null;
			if (p.areaName) {
				const key = v.areaKey!(p.siteId, p.areaName);
				areaId = areaIds.get(key) ?? null;
				if (!areaId) {
					const a = await trx
						.insertInto('area')
						.values({ organisation_id: organisationId, site_id: p.siteId, name: p.areaName })
						.returning('id')
						.executeTakeFirstOrThrow();
					areaId = a.id;
					areaIds.set(key, areaId);
				}
			}
			const i = p.input;
			const m = await trx
				.insertInto('machine')
				.values({
					organisation_id: organisationId,
					site_id: p.siteId,
					area_id: areaId,
					name: i.name,
					tag: i.tag,
					kind: i.kind,
					speed_rpm: i.speedRpm,
					speed_mode: i.speedMode,
					speed_signal: i.speedSignal,
					power_kw: i.powerKw,
					foundation: i.foundation,
					hazardous_area: i.hazardousArea,
					hazardous_zone_note: i.hazardousZoneNote,
					notes: i.notes
				})
				.returning('id')
				.executeTakeFirstOrThrow();
			out.push(m.id);
		}
		return out;
	});
	return { imported: ids.length, skipped: report.errorCount, ids, report };
}

/** A cell a spreadsheet would run as a formula gets a leading apostrophe (OWASP CSV injection). */
function guard(v: string) {
	return /^[=+\-@\t\r]/.test(v) ? `'${v}` : v;
}

export function machinesToCsv(rows: MachineDto[]): string {
	const data = rows.map((m) => [
		guard(m.siteName),
		guard(m.areaName ?? ''),
		guard(m.name),
		guard(m.tag ?? ''),
		m.kind,
		m.speedRpm ?? '',
		m.speedMode,
		m.speedSignal ? 'yes' : 'no',
		m.powerKw ?? '',
		m.foundation ?? '',
		m.hazardousArea ? 'yes' : 'no',
		guard(m.hazardousZoneNote),
		guard(m.notes)
	]);
	return '\uFEFF' + Papa.unparse({ fields: [...CSV_COLUMNS], data }, { newline: '\r\n' });
}
