// A small HTTP client with a cookie jar, for driving pages, form actions and the API as a browser would.
export class Client {
	cookies = new Map<string, string>();
	/** Sent with every request (e.g. x-forwarded-for, for an app started with ADDRESS_HEADER). */
	headers: Record<string, string> = {};
	constructor(readonly base: string) {}

	private cookieHeader() {
		return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
	}

	private keep(res: Response) {
		for (const c of res.headers.getSetCookie()) {
			const [pair] = c.split(';');
			const i = pair.indexOf('=');
			const name = pair.slice(0, i).trim();
			const value = pair.slice(i + 1).trim();
			if (!value || /max-age=0/i.test(c)) this.cookies.delete(name);
			else this.cookies.set(name, value);
		}
	}

	async request(path: string, init: RequestInit = {}): Promise<Response> {
		const headers = new Headers(init.headers);
		for (const [k, v] of Object.entries(this.headers)) if (!headers.has(k)) headers.set(k, v);
		if (this.cookies.size) headers.set('cookie', this.cookieHeader());
		if (!headers.has('origin')) headers.set('origin', this.base);
		const res = await fetch(this.base + path, { ...init, headers, redirect: 'manual' });
		this.keep(res);
		return res;
	}

	get(path: string, headers: Record<string, string> = { accept: 'text/html' }) {
		return this.request(path, { headers });
	}

	/** Submit a form action the way a browser without JavaScript does. */
	form(path: string, fields: Record<string, string>) {
		return this.request(path, {
			method: 'POST',
			headers: { 'content-type': 'application/x-www-form-urlencoded', accept: 'text/html' },
			body: new URLSearchParams(fields).toString()
		});
	}

	json(method: string, path: string, body?: unknown, raw = false) {
		return this.request(path, {
			method,
			headers: { 'content-type': 'application/json', accept: 'application/json' },
			body: body === undefined ? undefined : raw ? (body as string) : JSON.stringify(body)
		});
	}

	async signIn(email: string, password: string) {
		const res = await this.form('/sign-in', { email, password });
		if (res.status !== 303) throw new Error(`sign-in failed for ${email}: ${res.status}`);
		return res;
	}

	get sessionCookie() {
		return this.cookies.get('spotface_session');
	}
}
