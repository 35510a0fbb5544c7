// What may be written into a board document: the side panel validates each edit with these
// before it reaches the model, and the model operations parse again so nothing unchecked is
// stored. Units: lengths mm (route lengths m), temperatures °C, voltages V, cross-sections mm².
import { z } from 'zod';
import { CONDUCTOR_SIZES_MM2, DIRECTIONS, MATERIALS, MOUNTINGS, SURFACES } from '../trade';

export const POINT_STATUSES = ['proposed', 'flagged', 'rejected', 'approved'] as const;
export type PointStatus = (typeof POINT_STATUSES)[number];

export const POINT_STATUS_LABEL: Record<PointStatus, string> = {
	proposed: 'Proposed',
	flagged: 'Flagged for a look',
	rejected: 'Rejected',
	approved: 'Approved'
};

export const ZONE_KINDS = ['shaft', 'coupling', 'belt', 'fan', 'other'] as const;
export type ZoneKind = (typeof ZONE_KINDS)[number];
export const ZONE_KIND_LABEL: Record<ZoneKind, string> = {
	shaft: 'Shaft',
	coupling: 'Coupling',
	belt: 'Belt drive',
	fan: 'Fan',
	other: 'Other rotating part'
};

export const FIXINGS = ['clips', 'ties', 'tray', 'conduit', 'none'] as const;
export type Fixing = (typeof FIXINGS)[number];
export const FIXING_LABEL: Record<Fixing, string> = {
	clips: 'Cable clips',
	ties: 'Cable ties',
	tray: 'Cable tray',
	conduit: 'Conduit',
	none: 'Not fixed'
};

/** Board coordinates are image pixels; anything beyond this is a bug or a hostile update. */
const COORD_LIMIT = 1_000_000;

const coord = z
	.number({ error: 'Position must be a number.' })
	.refine(Number.isFinite, 'Position must be a finite number.')
	.refine((n) => Math.abs(n) <= COORD_LIMIT, 'Position is far outside the image.');

export const coordSchema = coord;
export const vec2Schema = z.tuple([coord, coord], { error: 'A corner is an [x, y] pair.' });

/** A moment in ms since 1970, as Date.now() gives it. */
export const timestampSchema = z
	.number({ error: 'A time must be a number.' })
	.refine((n) => Number.isFinite(n) && n >= 0 && n <= 8.64e15, 'Not a valid time.');

function optionalNumber(label: string, unit: string, min: number, max: number, opts: { exclusiveMin?: boolean } = {}) {
	const range = opts.exclusiveMin ? `above ${min} and up to ${max} ${unit}` : `${min} to ${max} ${unit}`;
	return z
		.number({ error: `${label}: enter a number in ${unit}.` })
		.refine(Number.isFinite, `${label}: enter a number in ${unit}.`)
		.refine((n) => (opts.exclusiveMin ? n > min : n >= min) && n <= max, `${label} must be ${range}.`)
		.nullable();
}

function choice<T extends readonly [string, ...string[]]>(values: T, label: string) {
	return z.enum(values, { error: `${label}: choose one of the options.` }).nullable();
}

export const pointFieldsSchema = z.object({
	label: z.string().trim().min(1, 'Give the point a label, e.g. P1.').max(40, 'A label has at most 40 characters.'),
	component: z.string().trim().max(120, 'At most 120 characters.'),
	direction: choice(DIRECTIONS, 'Direction'),
	/** Entered (tape measure): wins over the board estimate. */
	distanceToBearingMm: optionalNumber('Distance to bearing', 'mm', 0, 5000),
	/**
	 * A line measured on the photo from the seat to the bearing, in image coordinates. Its length
	 * follows the board scale, so recalibrating updates it; it is an estimate.
	 */
	distanceLine: z.tuple([vec2Schema, vec2Schema]).nullable(),
	surface: choice(SURFACES, 'Surface'),
	flatDiameterMm: optionalNumber('Flat seat diameter', 'mm', 0, 1000),
	wallThicknessMm: optionalNumber('Wall thickness', 'mm', 0, 500),
	mounting: choice(MOUNTINGS, 'Mounting'),
	material: choice(MATERIALS, 'Housing material'),
	surfaceTempC: optionalNumber('Surface temperature', '°C', -100, 600),
	status: z.enum(POINT_STATUSES, { error: 'Status: choose proposed, flagged, rejected or approved.' }),
	notes: z.string().max(2000, 'Notes have at most 2000 characters.')
});

export type PointFields = z.infer<typeof pointFieldsSchema>;
export type PointFieldKey = keyof PointFields;
export const pointPatchSchema = pointFieldsSchema.partial().strict();
export type PointPatch = z.infer<typeof pointPatchSchema>;

export const routeFieldsSchema = z.object({
	pointId: z.string().min(1, 'A route starts at a measurement point.').max(100, 'Not a point on this board.'),
	/** A 24 V DC supply point from the register, or null with an exit label. */
	supplyPointId: z.string().min(1).max(100, 'Not a supply point from the register.').nullable(),
	/** Where the cable leaves the photo when the supply is out of frame. */
	exitLabel: z.string().trim().max(80, 'At most 80 characters.'),
	lengthEnteredM: optionalNumber('Route length', 'm', 0, 10_000, { exclusiveMin: true }),
	crossSectionMm2: z
		.number({ error: 'Conductor cross-section: choose a size.' })
		.refine((n) => CONDUCTOR_SIZES_MM2.some((s) => Math.abs(s - n) < 1e-9), {
			message: `Conductor cross-section: choose ${CONDUCTOR_SIZES_MM2.join(', ')} mm².`
		})
		.nullable(),
	fixings: choice(FIXINGS, 'Fixings'),
	supplyV: optionalNumber('Measured supply voltage', 'V', 0, 60),
	notes: z.string().max(2000, 'Notes have at most 2000 characters.')
});
export type RouteFields = z.infer<typeof routeFieldsSchema>;
export type RouteFieldKey = keyof RouteFields;
export const routePatchSchema = routeFieldsSchema.omit({ pointId: true }).partial().strict();
export type RoutePatch = z.infer<typeof routePatchSchema>;

export const routeVerticesSchema = z.array(vec2Schema).min(2, 'A cable route needs at least two points.').max(500);

/** Statuses that record an engineer's review decision; only roles that may decide write them. */
export const REVIEW_DECISIONS = ['flagged', 'rejected', 'approved'] as const;
export type ReviewDecision = (typeof REVIEW_DECISIONS)[number];
export function isReviewDecision(status: unknown): status is ReviewDecision {
	return typeof status === 'string' && (REVIEW_DECISIONS as readonly string[]).includes(status);
}

/** Why an engineer flags or rejects a point: the trade's usual reasons, then free text. */
export const DECISION_REASONS = [
	'sheet_cover',
	'too_far',
	'no_flat_seat',
	'wall_too_thin',
	'cable_crosses_rotating',
	'supply_too_far',
	'other'
] as const;
export type DecisionReason = (typeof DECISION_REASONS)[number];
export const DECISION_REASON_LABEL: Record<DecisionReason, string> = {
	sheet_cover: 'On a sheet cover or guard',
	too_far: 'Too far from the bearing',
	no_flat_seat: 'No flat seat',
	wall_too_thin: 'Wall too thin for a stud',
	cable_crosses_rotating: 'Cable crosses a rotating part',
	supply_too_far: 'Supply too far',
	other: 'Other'
};

/** Who made a point's review decision and when; written with the status, cleared on reopening. */
export const pointDecisionSchema = z.object({
	decisionReason: z.enum(DECISION_REASONS, { error: 'Reason: choose one of the options.' }).nullable(),
	decisionNote: z.string().trim().max(500, 'At most 500 characters.').nullable(),
	decidedBy: z.string().max(200, 'At most 200 characters.').nullable(),
	decidedByName: z.string().max(200, 'At most 200 characters.').nullable(),
	decidedAt: timestampSchema.nullable()
});
export type PointDecision = z.infer<typeof pointDecisionSchema>;

/**
 * Every key a point, route or zone may hold in the board document, with its schema. The board
 * policy (board/model/policy.ts) refuses any other key and any value these refuse.
 */
/** Who last changed an item and when (for telling people whose value replaced theirs). */
export const editStampShape = {
	updatedBy: z.string().max(200, 'At most 200 characters.'),
	updatedAt: timestampSchema
};

export const pointItemShape = {
	...editStampShape,
	...pointFieldsSchema.shape,
	...pointDecisionSchema.shape,
	x: coord,
	y: coord,
	createdBy: z.string().max(200, 'At most 200 characters.'),
	createdAt: timestampSchema
};

export const zoneFieldsSchema = z.object({
	label: z.string().trim().max(60, 'At most 60 characters.'),
	kind: z.enum(ZONE_KINDS, { error: 'Choose what rotates here.' })
});
export type ZoneFields = z.infer<typeof zoneFieldsSchema>;
export const zonePatchSchema = zoneFieldsSchema.partial().strict();
export type ZonePatch = z.infer<typeof zonePatchSchema>;
export const zonePolygonSchema = z.array(vec2Schema).min(3, 'A keep-out zone needs at least three corners.').max(500);

export const routeItemShape = { ...routeFieldsSchema.shape, ...editStampShape, vertices: routeVerticesSchema, createdAt: timestampSchema };
export const zoneItemShape = { ...zoneFieldsSchema.shape, ...editStampShape, polygon: zonePolygonSchema, createdAt: timestampSchema };
/** Keys without which the board cannot show an item at all. */
export const REQUIRED_ITEM_KEYS = { point: ['x', 'y'], route: ['pointId', 'vertices'], zone: ['polygon'] } as const;

export const scaleSchema = z
	.object({
		a: vec2Schema,
		b: vec2Schema,
		lengthMm: z
			.number({ error: 'Real length: enter a number in mm.' })
			.refine((n) => Number.isFinite(n) && n > 0 && n <= 100_000, 'Real length must be above 0 and up to 100 000 mm.')
	})
	.refine((s) => Math.hypot(s.b[0] - s.a[0], s.b[1] - s.a[1]) >= 1, {
		message: 'Draw the reference line with two distinct ends.',
		path: ['b']
	});
export type ScaleData = z.infer<typeof scaleSchema>;

/**
 * Turns what was typed into a form control into a field value: empty means "not entered"
 * (null) for the optional number and choice fields, text stays text.
 */
export function fieldInput(kind: 'number' | 'choice' | 'text', raw: string): unknown {
	if (kind === 'text') return raw;
	const s = raw.trim();
	if (s === '') return null;
	if (kind === 'choice') return s;
	// Accept a decimal comma, as typed on many tablets.
	const n = Number(s.replace(',', '.'));
	return Number.isNaN(n) ? s : n;
}

/** Validates one field; the first message, or null when the value is fine. */
export function checkField<S extends z.ZodObject>(schema: S, key: keyof z.infer<S> & string, value: unknown): string | null {
	const field = schema.shape[key] as z.ZodType | undefined;
	if (!field) return `Unknown field ${key}.`;
	const r = field.safeParse(value);
	return r.success ? null : (r.error.issues[0]?.message ?? 'Not a valid value.');
}
