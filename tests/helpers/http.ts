// Plain HTTP against the running app, as a script or a browser without JavaScript would.

export class Client {
	cookies = new Map<string, string>();
	constructor(public baseURL: string) {}

	private cookieHeader() {
		return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
	}

	private keep(res: Response) {
		for (const line of res.headers.getSetCookie()) {
			const [pair, ...attrs] = line.split(';');
			const i = pair.indexOf('=');
			const name = pair.slice(0, i).trim();
			const value = pair.slice(i + 1).trim();
			const expired = attrs.some((a) => /max-age=0\b/i.test(a.trim()) || /expires=Thu, 01 Jan 1970/i.test(a));
			if (expired || value === '') this.cookies.delete(name);
			else this.cookies.set(name, value);
		}
	}

	async request(method: string, path: string, init: { form?: Record<string, string>; json?: unknown; headers?: Record<string, string>; body?: BodyInit } = {}) {
		const headers: Record<string, string> = { origin: this.baseURL, ...init.headers };
		if (this.cookies.size) headers.cookie = this.cookieHeader();
		let body: BodyInit | undefined = init.body;
		if (init.form) {
			body = new URLSearchParams(init.form);
			headers['content-type'] = 'application/x-www-form-urlencoded';
			// As a browser posting a form without JavaScript: SvelteKit answers with a redirect or
			// a page, not the JSON it gives to enhanced forms.
			headers.accept ??= 'text/html';
		} else if (init.json !== undefined) {
			body = JSON.stringify(init.json);
			headers['content-type'] = 'application/json';
		}
		const res = await fetch(this.baseURL + path, { method, headers, body, redirect: 'manual' });
		this.keep(res);
		return res;
	}

	get(path: string, headers: Record<string, string> = {}) {
		return this.request('GET', path, { headers });
	}

	/** Signs in through the sign-in page's password action; returns the response. */
	async signIn(email: string, password: string) {
		return this.request('POST', '/signin?/password', {
			form: { email, password, providerId: 'credentials', redirectTo: '/' }
		});
	}

	get signedIn() {
		return [...this.cookies.keys()].some((k) => k.includes('session-token'));
	}
}
