// Threshold overrides as sent by the settings form and the API. The per-field ranges and most
// cross-field rules come from the trade module's thresholdsSchema; this adds the checks the
// settings page needs on top (a strict check-below-fail ordering, plain words for negatives)
// and turns form strings into numbers without losing what was typed.
import {
	DEFAULT_THRESHOLDS,
	THRESHOLD_KEYS,
	THRESHOLD_META,
	formatQuantity,
	parseQuantity,
	quantityOfUnit,
	thresholdsSchema,
	type ThresholdKey,
	type Thresholds,
	type UnitSystem
} from '../trade';

export type ThresholdErrors = Partial<Record<ThresholdKey | '_', string[]>>;

export type ThresholdValidation = { ok: true; overrides: Partial<Thresholds> } | { ok: false; errors: ThresholdErrors };

const META = new Map(THRESHOLD_META.map((m) => [m.key, m]));

function isKey(k: string): k is ThresholdKey {
	return (THRESHOLD_KEYS as readonly string[]).includes(k);
}

function add(errors: ThresholdErrors, key: ThresholdKey | '_', message: string) {
	const list = (errors[key] ??= []);
	if (!list.includes(message)) list.push(message);
}

/** Keeps only the keys whose value differs from the default, so a default change reaches everyone. */
export function withoutDefaults(overrides: Partial<Thresholds>): Partial<Thresholds> {
	const out: Partial<Thresholds> = {};
	for (const [k, v] of Object.entries(overrides) as [ThresholdKey, number][]) {
		if (v !== undefined && v !== DEFAULT_THRESHOLDS[k]) out[k] = v;
	}
	return out;
}

/**
 * Validates a set of overrides (the whole set: keys left out fall back to their defaults).
 * Errors are keyed by threshold so they can be shown beside the field.
 */
export function validateThresholdOverrides(input: unknown): ThresholdValidation {
	const errors: ThresholdErrors = {};
	if (typeof input !== 'object' || input === null || Array.isArray(input)) {
		add(errors, '_', 'Send the thresholds as an object of { name: number }.');
		return { ok: false, errors };
	}
	for (const [k, v] of Object.entries(input)) {
		if (!isKey(k)) add(errors, '_', `Unknown threshold: ${k}`);
		else if (typeof v === 'number' && v < 0) add(errors, k, `${META.get(k)!.label} cannot be negative (got ${v} ${META.get(k)!.unit}).`);
	}
	const parsed = thresholdsSchema.safeParse(input);
	if (!parsed.success) {
		// An ordering between two values means little while one of them is itself out of range.
		const fieldProblems = Object.keys(errors).length > 0 || parsed.error.issues.some((i) => i.code !== 'custom');
		for (const issue of parsed.error.issues) {
			if (issue.code === 'unrecognized_keys') continue; // reported above, one line per key
			if (issue.code === 'custom' && fieldProblems) continue;
			const k = String(issue.path[0] ?? '_');
			if (isKey(k) && errors[k]?.length) continue; // one plain message per field is enough
			add(errors, isKey(k) ? k : '_', issue.message);
		}
	}
	if (Object.keys(errors).length) return { ok: false, errors };

	const overrides = parsed.success ? parsed.data : {};
	// The trade schema allows the check level to equal the fail level; on the settings page an
	// equal pair would make the check band empty, which is never what anyone means.
	const t = { ...DEFAULT_THRESHOLDS, ...overrides };
	if (t.distanceWarnMm >= t.distanceFailMm) {
		const key: ThresholdKey = 'distanceFailMm' in overrides && !('distanceWarnMm' in overrides) ? 'distanceFailMm' : 'distanceWarnMm';
		add(
			errors,
			key,
			`Distance to bearing: the check level (${t.distanceWarnMm} mm) must be below the fail level (${t.distanceFailMm} mm).`
		);
		return { ok: false, errors };
	}
	return { ok: true, overrides: withoutDefaults(overrides) };
}

/**
 * Reads the settings form: one text field per threshold. An empty field means "use the
 * default". Comma decimals (12,5) are accepted, as tablets in many locales type them.
 * Returns the typed strings so the form can show them again.
 */
export function parseThresholdForm(
	form: FormData,
	system: UnitSystem = 'metric'
): {
	values: Record<string, string>;
	result: ThresholdValidation;
} {
	const values: Record<string, string> = {};
	const numbers: Partial<Thresholds> = {};
	const errors: ThresholdErrors = {};
	for (const key of THRESHOLD_KEYS) {
		const raw = form.get(key);
		const text = typeof raw === 'string' ? raw.trim() : '';
		values[key] = text;
		if (text === '') continue;
		const meta = META.get(key)!;
		const q = quantityOfUnit(meta.unit);
		if (q) {
			// Lengths, temperatures and torques arrive in the person's unit; store SI.
			const parsed = parseQuantity(q, text, system, meta.label);
			if (!parsed.ok) {
				add(errors, key, `${parsed.message.replace(/\.$/, '')}; leave it empty for the default.`);
				continue;
			}
			const si = parsed.si!;
			if (si < 0 && system === 'metric') {
				add(errors, key, `${meta.label} cannot be negative (got ${text} ${meta.unit}).`);
				continue;
			}
			if (si < meta.min || si > meta.max) {
				const digits = system === 'us' ? 3 : 4;
				add(
					errors,
					key,
					`${meta.label} must be ${si < meta.min ? 'at least' : 'at most'} ${formatQuantity(q, si < meta.min ? meta.min : meta.max, system, digits)}.`
				);
				continue;
			}
			numbers[key] = si;
			continue;
		}
		const normalised = /^-?\d+,\d+$/.test(text) ? text.replace(',', '.') : text;
		const n = Number(normalised);
		if (!/^-?(\d+\.?\d*|\.\d+)(e-?\d+)?$/i.test(normalised) || !Number.isFinite(n)) {
			add(errors, key, `${meta.label} must be a number in ${meta.unit}; leave it empty for the default.`);
			continue;
		}
		numbers[key] = n;
	}
	// Values equal to their defaults are left out first, so an ordering error lands on the field
	// that was changed rather than on its unchanged partner.
	const checked = validateThresholdOverrides(withoutDefaults(numbers));
	if (!Object.keys(errors).length) return { values, result: checked };
	// Report the other fields' problems too, so one round trip shows everything to correct.
	if (!checked.ok) for (const [k, list] of Object.entries(checked.errors)) if (!errors[k as ThresholdKey]) errors[k as ThresholdKey] = list;
	return { values, result: { ok: false, errors } };
}

/** The first message per field, as the form components show one line. */
export function firstErrors(errors: ThresholdErrors): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [k, list] of Object.entries(errors)) if (list?.length) out[k] = list[0];
	return out;
}
