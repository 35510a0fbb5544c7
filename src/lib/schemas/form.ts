import type { z } from 'zod';

export type FieldErrors = Record<string, string | undefined>;

/** Parse FormData with a zod schema: the values to show again and the first error per field. */
export function parseForm<T extends z.ZodType>(form: FormData, schema: T, omit: string[] = ['password', 'confirm']) {
	const raw: Record<string, string> = {};
	for (const [k, v] of form.entries()) if (typeof v === 'string') raw[k] = v;
	const values: Record<string, string> = {};
	for (const [k, v] of Object.entries(raw)) if (!omit.includes(k)) values[k] = v;
	const parsed = schema.safeParse(raw);
	if (parsed.success) return { ok: true as const, data: parsed.data as z.infer<T>, values };
	const errors: FieldErrors = {};
	for (const issue of parsed.error.issues) {
		const key = String(issue.path[0] ?? '_');
		errors[key] ??= issue.message;
	}
	return { ok: false as const, errors, values };
}
