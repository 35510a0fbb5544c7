// The machine register's schemas. Each one accepts both a JSON body (numbers, booleans, null)
// and an HTML form or CSV row (strings), so the API, the forms and the CSV import share one
// set of rules and one set of messages.
import { z } from 'zod';

export const MACHINE_KINDS = ['motor', 'pump', 'fan', 'compressor', 'gearbox', 'blower', 'other'] as const;
export const SPEED_MODES = ['constant', 'variable'] as const;
export const FOUNDATIONS = ['rigid', 'flexible'] as const;
export const BEARING_POSITIONS = ['drive_end', 'non_drive_end'] as const;
export const MEDIA_KINDS = ['photo', 'drawing'] as const;

export const KIND_LABEL: Record<(typeof MACHINE_KINDS)[number], string> = {
	motor: 'Motor',
	pump: 'Pump',
	fan: 'Fan',
	compressor: 'Compressor',
	gearbox: 'Gearbox',
	blower: 'Blower',
	other: 'Other'
};
export const POSITION_LABEL: Record<(typeof BEARING_POSITIONS)[number], string> = {
	drive_end: 'Drive end (DE)',
	non_drive_end: 'Non-drive end (NDE)'
};

const blankToNull = (v: unknown) => (v === undefined || (typeof v === 'string' && v.trim() === '') ? null : v);

/** Text that may be left empty (stored as ''). */
const text = (max: number, label: string) =>
	z.preprocess(
		(v) => (v == null ? '' : v),
		z
			.string({ error: `${label} must be text.` })
			.trim()
			.max(max, `${label} has at most ${max} characters.`)
	);

/** Text that may be left empty (stored as null). */
const optionalText = (max: number, label: string) =>
	z.preprocess(
		blankToNull,
		z
			.string({ error: `${label} must be text.` })
			.trim()
			.max(max, `${label} has at most ${max} characters.`)
			.nullable()
	);

const requiredText = (max: number, message: string, label: string) =>
	z.string({ error: message }).trim().min(1, message).max(max, `${label} has at most ${max} characters.`);

/** A number typed in a form or a spreadsheet: accepts "7.5", "7,5" and " 1 500 ". */
function toNumber(v: unknown): unknown {
	if (v === undefined) return null;
	if (typeof v !== 'string') return v;
	const s = v.trim().replace(/[\s\u00a0]/g, '');
	if (s === '') return null;
	const normalised = /^-?\d+,\d+$/.test(s) ? s.replace(',', '.') : s;
	const n = Number(normalised);
	return Number.isFinite(n) ? n : v;
}

const optionalNumber = (label: string, opts: { min?: number; max?: number; gt?: number; int?: boolean; unit?: string }) => {
	const unit = opts.unit ? ` ${opts.unit}` : '';
	let n = z.number({ error: `${label} must be a number${opts.unit ? ` in ${opts.unit}` : ''}.` });
	if (opts.int) n = n.int(`${label} must be a whole number.`);
	if (opts.gt !== undefined) n = n.gt(opts.gt, `${label} must be more than ${opts.gt}${unit}.`);
	if (opts.min !== undefined) n = n.min(opts.min, `${label} must be at least ${opts.min}${unit}.`);
	if (opts.max !== undefined) n = n.max(opts.max, `${label} must be at most ${opts.max}${unit}.`);
	return z.preprocess(toNumber, n.nullable());
};

/** Checkbox, JSON boolean or a spreadsheet's yes/no. Missing means false. */
export const flag = (label: string) =>
	z.preprocess(
		(v) => {
			if (v == null) return false;
			if (typeof v === 'string') {
				const s = v.trim().toLowerCase();
				if (['', 'no', 'n', 'false', '0', 'off'].includes(s)) return false;
				if (['yes', 'y', 'true', '1', 'on', 'x'].includes(s)) return true;
			}
			return v;
		},
		z.boolean({ error: `${label}: answer yes or no.` })
	);

const uuid = (message: string) =>
	z
		.string({ error: message })
		.trim()
		.regex(/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i, message);
const optionalUuid = (message: string) => z.preprocess(blankToNull, uuid(message).nullable());

function lowerEnum<T extends readonly [string, ...string[]]>(values: T, message: string) {
	return z.preprocess(
		(v) =>
			typeof v === 'string'
				? v
						.trim()
						.toLowerCase()
						.replace(/[\s-]+/g, '_')
				: v,
		z.enum(values, { error: message })
	);
}

// --- site, area, supply point --------------------------------------------------------------

export const siteSchema = z.object({
	name: requiredText(120, 'Enter the site name.', 'A site name'),
	code: optionalText(40, 'The site code'),
	address: text(500, 'The address'),
	notes: text(4000, 'The notes')
});
export const siteUpdateSchema = siteSchema.partial();

export const areaSchema = z.object({
	siteId: uuid('Choose the site this area belongs to.'),
	name: requiredText(120, 'Enter the area name.', 'An area name'),
	notes: text(4000, 'The notes')
});
export const areaUpdateSchema = areaSchema.omit({ siteId: true }).partial();

export const supplyPointSchema = z.object({
	areaId: uuid('Choose the area of this supply point.'),
	name: requiredText(120, 'Enter a name for the supply point, e.g. "Junction box JB-3".', 'A name'),
	tag: optionalText(60, 'The tag'),
	// 24 V DC nominal (IEC 61131-2); other DC voltages up to 60 V are allowed for odd installations.
	voltageV: z.preprocess(
		(v) => (blankToNull(v) === null ? 24 : toNumber(v)),
		z
			.number({ error: 'The voltage must be a number in V.' })
			.gt(0, 'The voltage must be more than 0 V.')
			.max(60, 'Sensor supplies here are low-voltage DC: at most 60 V.')
	),
	maxCurrentA: optionalNumber('The maximum current', { gt: 0, max: 100, unit: 'A' }),
	locationNote: text(500, 'The location note')
});
export const supplyPointUpdateSchema = supplyPointSchema.omit({ areaId: true }).partial();

// --- machine -------------------------------------------------------------------------------

/** What a technician may change on the walk (register.field-edit). */
export const machineFieldSchema = z.object({
	speedRpm: optionalNumber('The nominal speed', { gt: 0, max: 100000, unit: 'rpm' }),
	speedMode: z.preprocess(
		(v) => (v == null || (typeof v === 'string' && v.trim() === '') ? 'constant' : typeof v === 'string' ? v.trim().toLowerCase() : v),
		z.enum(SPEED_MODES, { error: 'Choose constant or variable speed.' })
	),
	speedSignal: flag('Speed signal available'),
	powerKw: optionalNumber('The power', { gt: 0, max: 100000, unit: 'kW' }),
	foundation: z.preprocess(
		(v) =>
			v === undefined
				? null
				: typeof v === 'string'
					? v.trim() === '' || v.trim().toLowerCase() === 'unknown'
						? null
						: v.trim().toLowerCase()
					: v,
		z.enum(FOUNDATIONS, { error: 'Choose a rigid or a flexible foundation (or leave it unknown).' }).nullable()
	),
	hazardousArea: flag('Hazardous area'),
	hazardousZoneNote: text(500, 'The zone note'),
	notes: text(4000, 'The notes')
});

const machineIdentity = z.object({
	siteId: uuid('Choose the site of this machine.'),
	areaId: optionalUuid('Choose an area of the site, or none.'),
	name: requiredText(120, 'Enter the machine name, e.g. "Raw water pump 2".', 'A machine name'),
	tag: optionalText(60, 'The tag'),
	kind: lowerEnum(MACHINE_KINDS, 'Choose the kind: motor, pump, fan, compressor, gearbox, blower or other.')
});

export type Issues = Record<string, string>;

/** Rules across fields; checked on create and, for an update, on the row as it will be. */
export function machineIssues(v: { hazardousArea?: boolean; hazardousZoneNote?: string }): Issues {
	const out: Issues = {};
	if (v.hazardousArea === true && !String(v.hazardousZoneNote ?? '').trim()) {
		out.hazardousZoneNote = 'Say which hazardous zone applies (e.g. "Zone 1, gas group IIA") so the installer brings certified equipment.';
	}
	return out;
}

/**
 * Add the cross-field rules as checks that run even when single fields failed, so a form shows
 * every problem at once. The checks read the raw values defensively for that reason.
 */
function withIssues<T extends z.ZodType>(schema: T, check: (v: z.output<T>) => Issues, paths: string[]) {
	let out = schema as unknown as z.ZodType<z.output<T>, z.input<T>>;
	for (const path of paths) {
		out = out.refine((v) => !check(v)[path], {
			path: [path],
			error: (iss) => check(iss.input as z.output<T>)[path] ?? 'Invalid value.',
			// Also when single fields failed, but only on an object (a body of `null` is a plain 400).
			when: (payload) => typeof payload.value === 'object' && payload.value !== null
		});
	}
	return out;
}

export const machineSchema = withIssues(machineIdentity.extend(machineFieldSchema.shape), machineIssues, ['hazardousZoneNote']);
export const machineUpdateSchema = machineIdentity.extend(machineFieldSchema.shape).partial();
export const machineFieldUpdateSchema = machineFieldSchema.partial();
export const MACHINE_FIELD_KEYS = Object.keys(machineFieldSchema.shape) as Array<keyof z.infer<typeof machineFieldSchema>>;

// --- bearing -------------------------------------------------------------------------------

const bearingBase = z.object({
	position: lowerEnum(BEARING_POSITIONS, 'Choose drive end or non-drive end.'),
	component: text(80, 'The component'),
	designation: text(60, 'The designation'),
	rollingElements: optionalNumber('The number of rolling elements', { int: true, min: 3, max: 200 }),
	rollingElementDMm: optionalNumber('The rolling-element diameter', { gt: 0, max: 500, unit: 'mm' }),
	pitchDMm: optionalNumber('The pitch diameter', { gt: 0, max: 5000, unit: 'mm' }),
	contactAngleDeg: z.preprocess(
		(v) => (blankToNull(v) === null ? 0 : toNumber(v)),
		z
			.number({ error: 'The contact angle must be a number in degrees.' })
			.min(0, 'The contact angle must be at least 0°.')
			.lt(90, 'The contact angle must be less than 90°.')
	),
	notes: text(2000, 'The notes')
});

export function bearingIssues(v: { rollingElements?: number | null; rollingElementDMm?: number | null; pitchDMm?: number | null }): Issues {
	const out: Issues = {};
	// The rolling elements sit on the pitch circle, so their diameter is smaller than it.
	if (typeof v.rollingElementDMm === 'number' && typeof v.pitchDMm === 'number' && v.rollingElementDMm >= v.pitchDMm) {
		out.rollingElementDMm = 'The rolling-element diameter must be smaller than the pitch diameter.';
	} else if (
		typeof v.rollingElements === 'number' &&
		typeof v.rollingElementDMm === 'number' &&
		typeof v.pitchDMm === 'number' &&
		v.rollingElements * v.rollingElementDMm >= Math.PI * v.pitchDMm
	) {
		// n·d < π·D: the rolling elements must fit round the pitch circle.
		out.rollingElements = `${v.rollingElements} rolling elements of ${v.rollingElementDMm} mm do not fit round a ${v.pitchDMm} mm pitch circle: check the count and the units.`;
	}
	return out;
}

export const bearingSchema = withIssues(bearingBase, bearingIssues, ['rollingElementDMm', 'rollingElements']);
export const bearingUpdateSchema = bearingBase.partial();

// --- lists ---------------------------------------------------------------------------------

const int = (def: number, min: number, max: number) =>
	z.preprocess((v) => (v == null || v === '' ? def : Number(v)), z.number().int().min(min).max(max)).catch(def);

export const pageQuerySchema = z.object({
	page: int(1, 1, 100000),
	perPage: int(50, 1, 200),
	q: z.string().trim().max(200).catch('').default(''),
	archived: z.enum(['live', 'archived', 'all']).catch('live').default('live')
});

export const MACHINE_SORTS = ['name', 'tag', 'kind', 'site', 'area', 'speed', 'power', 'updated'] as const;
export const machineListQuerySchema = pageQuerySchema.extend({
	sort: z.enum(MACHINE_SORTS).catch('name').default('name'),
	dir: z.enum(['asc', 'desc']).catch('asc').default('asc'),
	kind: z.enum(MACHINE_KINDS).optional().catch(undefined),
	siteId: uuid('bad site').optional().catch(undefined),
	areaId: uuid('bad area').optional().catch(undefined),
	hazardous: z.enum(['yes', 'no']).optional().catch(undefined)
});
export type MachineListQuery = z.infer<typeof machineListQuerySchema>;

export function queryObject(url: URL): Record<string, string> {
	return Object.fromEntries(url.searchParams.entries());
}

/** GET /machines/:id/media */
export const mediaListQuerySchema = pageQuerySchema.extend({ kind: z.enum(MEDIA_KINDS).optional().catch(undefined) });

/** POST /machines/:id/media: the form fields beside the `file`. */
export const mediaUploadFieldsSchema = z.object({
	kind: z.preprocess((x) => (x === '' || x == null ? undefined : x), z.enum(MEDIA_KINDS, { error: 'Choose photo or drawing.' }).optional()),
	caption: z.preprocess((x) => (x == null ? '' : x), z.string().trim().max(300, 'A caption has at most 300 characters.'))
});

/** POST /machines/import */
export const machineImportQuerySchema = z.object({
	siteId: z.uuid({ error: 'siteId must be a site id.' }).optional(),
	mode: z
		.enum(['all', 'valid'], { error: 'mode is "all" (nothing unless every row is valid) or "valid" (the good rows only).' })
		.default('all'),
	dryRun: z.enum(['true', 'false', '1', '0']).default('false')
});

export const mediaUpdateSchema = z.object({
	caption: text(300, 'The caption').optional(),
	kind: z.enum(MEDIA_KINDS, { error: 'Choose photo or drawing.' }).optional()
});

export type SiteInput = z.infer<typeof siteSchema>;
export type AreaInput = z.infer<typeof areaSchema>;
export type SupplyPointInput = z.infer<typeof supplyPointSchema>;
export type MachineInput = z.infer<typeof machineSchema>;
export type MachineUpdate = z.infer<typeof machineUpdateSchema>;
export type BearingInput = z.infer<typeof bearingSchema>;
export type BearingUpdate = z.infer<typeof bearingUpdateSchema>;
