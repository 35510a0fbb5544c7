// RFC 9457 problem details: the single error shape of the JSON API.
import type { z } from 'zod';

export interface Problem {
	type: string;
	title: string;
	status: number;
	detail?: string;
	errors?: Record<string, string[]>;
}

const TITLES: Record<number, string> = {
	400: 'Bad request',
	401: 'Not signed in',
	403: 'Not allowed',
	404: 'Not found',
	409: 'Conflict',
	413: 'Too large',
	415: 'Unsupported media type',
	422: 'Invalid input',
	429: 'Too many requests',
	500: 'Server error'
};

export function problem(
	status: number,
	detail?: string,
	extra: { errors?: Record<string, string[]>; title?: string; headers?: Record<string, string> } = {}
): Response {
	const body: Problem = {
		type: 'about:blank',
		title: extra.title ?? TITLES[status] ?? 'Error',
		status,
		...(detail ? { detail } : {}),
		...(extra.errors ? { errors: extra.errors } : {})
	};
	return new Response(JSON.stringify(body), {
		status,
		headers: { 'content-type': 'application/problem+json', ...(extra.headers ?? {}) }
	});
}

/** Flatten zod issues into { field: [messages] }, using dotted paths. */
export function fieldErrors(error: z.ZodError): Record<string, string[]> {
	const out: Record<string, string[]> = {};
	for (const issue of error.issues) {
		const key = issue.path.length ? issue.path.join('.') : '_';
		(out[key] ??= []).push(issue.message);
	}
	return out;
}

/** Read and validate a JSON body. Returns the data, or a 400 problem response. */
export async function readJson<T extends z.ZodType>(
	request: Request,
	schema: T,
	maxBytes = 1_000_000
): Promise<{ ok: true; data: z.infer<T> } | { ok: false; response: Response }> {
	const type = request.headers.get('content-type') ?? '';
	if (!type.includes('application/json')) {
		return { ok: false, response: problem(415, 'Send the body as JSON with Content-Type: application/json.') };
	}
	const text = await request.text();
	if (text.length > maxBytes) return { ok: false, response: problem(413, `The body is larger than ${maxBytes} bytes.`) };
	let raw: unknown;
	try {
		raw = JSON.parse(text);
	} catch (e) {
		return { ok: false, response: problem(400, `The body is not valid JSON: ${(e as Error).message}`) };
	}
	const parsed = schema.safeParse(raw);
	if (!parsed.success) {
		return {
			ok: false,
			response: problem(400, 'Some fields are invalid.', { errors: fieldErrors(parsed.error), title: 'Invalid input' })
		};
	}
	return { ok: true, data: parsed.data };
}

export function json(data: unknown, init: ResponseInit = {}): Response {
	return new Response(JSON.stringify(data), {
		...init,
		headers: { 'content-type': 'application/json', ...(init.headers ?? {}) }
	});
}
