/**
 * Input guards shared by the calculators. Each throws a RangeError whose message names the
 * field, so a caller (or a technician reading an error toast) can see which value is wrong.
 */

export function describe(value: unknown): string {
	if (typeof value === 'number') return Number.isNaN(value) ? 'NaN' : String(value);
	if (typeof value === 'string') return JSON.stringify(value);
	if (value === null) return 'null';
	return typeof value;
}

/** A finite number, optionally bounded (inclusive unless `exclusiveMin`). */
export function requireNumber(
	field: string,
	value: unknown,
	opts: { min?: number; max?: number; exclusiveMin?: boolean; integer?: boolean; unit?: string } = {}
): number {
	const unit = opts.unit ? ` ${opts.unit}` : '';
	if (typeof value !== 'number' || !Number.isFinite(value)) {
		throw new RangeError(`${field} must be a finite number, got ${describe(value)}`);
	}
	if (opts.integer && !Number.isInteger(value)) {
		throw new RangeError(`${field} must be a whole number, got ${value}`);
	}
	if (opts.min !== undefined) {
		if (opts.exclusiveMin ? value <= opts.min : value < opts.min) {
			const rel = opts.exclusiveMin ? 'greater than' : 'at least';
			throw new RangeError(`${field} must be ${rel} ${opts.min}${unit}, got ${value}${unit}`);
		}
	}
	if (opts.max !== undefined && value > opts.max) {
		throw new RangeError(`${field} must be at most ${opts.max}${unit}, got ${value}${unit}`);
	}
	return value;
}

export function requireOneOf<T extends string | number>(field: string, value: unknown, allowed: readonly T[]): T {
	if (!(allowed as readonly unknown[]).includes(value)) {
		throw new RangeError(`${field} must be one of ${allowed.map((a) => JSON.stringify(a)).join(', ')}, got ${describe(value)}`);
	}
	return value as T;
}

export function requireObject(field: string, value: unknown): Record<string, unknown> {
	if (typeof value !== 'object' || value === null || Array.isArray(value)) {
		throw new RangeError(`${field} must be an object, got ${Array.isArray(value) ? 'array' : describe(value)}`);
	}
	return value as Record<string, unknown>;
}

/**
 * Runs independent checks and returns the message of every one that fails, so a form can show
 * all its bad fields at once instead of the first. Errors other than RangeError are rethrown.
 */
export function collectIssues(checks: ReadonlyArray<() => unknown>): string[] {
	const out: string[] = [];
	for (const check of checks) {
		try {
			check();
		} catch (e) {
			if (!(e instanceof RangeError)) throw e;
			out.push(e.message);
		}
	}
	return out;
}
