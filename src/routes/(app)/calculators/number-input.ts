/** What a calculator input holds: a number, nothing yet, or text that is not a number. */
export type ParsedNumber = { kind: 'number'; value: number } | { kind: 'empty' } | { kind: 'bad' };

/** Reads typed text as a number; accepts a comma decimal (12,5) as tablets in many locales type it. */
export function parseNumber(text: string): ParsedNumber {
	const t = text.trim().replace(/^−/, '-');
	if (t === '') return { kind: 'empty' };
	const n = /^-?\d+,\d+$/.test(t) ? Number(t.replace(',', '.')) : Number(t);
	if (!/^-?(\d+[.,]?\d*|[.,]\d+)(e[-+]?\d+)?$/i.test(t) || !Number.isFinite(n)) return { kind: 'bad' };
	return { kind: 'number', value: n };
}

/**
 * Reads several fields at once. Returns the numbers when every required field holds one, plus a
 * message per field that is empty or not a number.
 */
export function readFields<K extends string>(
	fields: Record<K, { text: string; label: string; required?: boolean }>
): { values: Partial<Record<K, number>>; errors: Partial<Record<K, string>>; complete: boolean } {
	const values: Partial<Record<K, number>> = {};
	const errors: Partial<Record<K, string>> = {};
	let complete = true;
	for (const key of Object.keys(fields) as K[]) {
		const f = fields[key];
		const p = parseNumber(f.text);
		if (p.kind === 'number') values[key] = p.value;
		else if (p.kind === 'bad') {
			errors[key] = `${f.label}: enter a number.`;
			complete = false;
		} else if (f.required !== false) complete = false;
	}
	return { values, errors, complete };
}

/**
 * Turns a trade RangeError ("bearing.ballDiameter (2) must be …") into words for the field it
 * names, and says which field that is.
 */
export function explainRangeError<K extends string>(
	e: unknown,
	names: Record<K, { path: string; label: string }>
): { field: K | null; message: string } {
	const raw = e instanceof Error ? e.message : String(e);
	let field: K | null = null;
	let message = raw;
	// Longest path first, so 'bearing.balls' does not claim 'bearing.ballDiameter'.
	const entries = (Object.entries(names) as [K, { path: string; label: string }][]).sort((a, b) => b[1].path.length - a[1].path.length);
	for (const [key, n] of entries) {
		if (field === null && message.startsWith(n.path)) field = key;
		message = message.split(n.path).join(n.label);
	}
	message = message.charAt(0).toUpperCase() + message.slice(1);
	return { field, message: /[.!?]$/.test(message) ? message : `${message}.` };
}

/** One message per field from a list of trade messages (each names its field), the first for each field. */
export function issuesByField<K extends string>(
	messages: string[],
	names: Record<K, { path: string; label: string }>,
	fallback: NoInfer<K>
): Partial<Record<K, string>> {
	const out: Partial<Record<K, string>> = {};
	for (const m of messages) {
		const x = explainRangeError(new RangeError(m), names);
		out[x.field ?? fallback] ??= x.message;
	}
	return out;
}
