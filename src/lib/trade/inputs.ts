import type { Finding } from './findings';
import { describe } from './validate';

/** Returned by the reader for a value that is present but unusable. */
export class BadInput {
	readonly bad = true;
}
export const BAD = new BadInput();
export type Read<T> = T | undefined | BadInput;

const INPUT_REFERENCE = 'Spotface input checks';

/** Plain number formatting for messages: at most `digits` decimals, no trailing zeros. */
export function fmt(n: number, digits = 1): string {
	if (!Number.isFinite(n)) return String(n);
	return String(Number(n.toFixed(digits)));
}

/**
 * Reads untrusted values for the rule engine. Instead of throwing, a bad value becomes a
 * 'fail' finding naming the field, and the rules that need it are skipped, so a broken
 * record can never read as good. `null` counts as "not entered", as database rows use it.
 */
export class InputReader {
	readonly findings: Finding[] = [];

	invalid(path: string, message: string): BadInput {
		this.findings.push({
			rule: 'input.invalid',
			severity: 'fail',
			message: `${message} (${path})`,
			reference: INPUT_REFERENCE,
			field: path
		});
		return BAD;
	}

	/** A required value that was not given: the same 'fail', flagged so a UI can prompt for it. */
	missing(path: string, message: string): BadInput {
		this.findings.push({
			rule: 'input.invalid',
			severity: 'fail',
			message: `${message} (${path})`,
			reference: INPUT_REFERENCE,
			field: path,
			missing: true
		});
		return BAD;
	}

	object(path: string, label: string, value: unknown, required: boolean): Read<Record<string, unknown>> {
		if (value === undefined || value === null) {
			return required ? this.missing(path, `${label} missing: fill them in before the point can be checked`) : undefined;
		}
		if (typeof value !== 'object' || Array.isArray(value)) {
			return this.invalid(path, `${label} are not in the expected form (got ${describe(value)})`);
		}
		return value as Record<string, unknown>;
	}

	number(
		path: string,
		label: string,
		value: unknown,
		r: { min: number; max: number; unit: string; exclusiveMin?: boolean; required?: boolean; integer?: boolean }
	): Read<number> {
		if (value === undefined || value === null) {
			return r.required ? this.missing(path, `${label} is missing: enter it in ${r.unit}`) : undefined;
		}
		if (typeof value !== 'number' || !Number.isFinite(value)) {
			return this.invalid(path, `${label} is not a number (got ${describe(value)}): enter it in ${r.unit}`);
		}
		const belowMin = r.exclusiveMin ? value <= r.min : value < r.min;
		if (belowMin || value > r.max || (r.integer && !Number.isInteger(value))) {
			const range = r.exclusiveMin ? `above ${r.min} and up to ${r.max}` : `${r.min} to ${r.max}`;
			return this.invalid(path, `${label} of ${value} ${r.unit} cannot be right (expected ${range} ${r.unit}): check and correct it`);
		}
		return value;
	}

	choice<T extends string | number>(path: string, label: string, value: unknown, allowed: readonly T[], required: boolean): Read<T> {
		if (value === undefined || value === null) {
			return required ? this.missing(path, `${label} is missing: choose one`) : undefined;
		}
		if (!(allowed as readonly unknown[]).includes(value)) {
			return this.invalid(path, `${label} ${describe(value)} is not one of the choices (${allowed.map(String).join(', ')})`);
		}
		return value as T;
	}

	flag(path: string, label: string, value: unknown, required: boolean): Read<boolean> {
		if (value === undefined || value === null) {
			return required ? this.missing(path, `${label} is missing: answer yes or no`) : undefined;
		}
		if (typeof value !== 'boolean') return this.invalid(path, `${label} must be yes or no (got ${describe(value)})`);
		return value;
	}
}

export function isGood<T>(v: Read<T>): v is T {
	return v !== undefined && !(v instanceof BadInput);
}

export function isBad(v: unknown): v is BadInput {
	return v instanceof BadInput;
}
