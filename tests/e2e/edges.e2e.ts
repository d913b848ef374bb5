// The edges of the HTTP server (server.js around adapter-node's handler): body limits whose
// 413 reaches the client, security headers on every kind of response, the other loopback name
// and cross-site forms, tried over HTTP and in chromium against the built app.
import { spawn, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { readFileSync } from 'node:fs';
import http from 'node:http';
import net from 'node:net';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { sharedBrowser } from '../helpers/browser';
import { Client } from '../helpers/http';

const baseURL = inject('baseURL');
const OWNER = { email: 'owner@brackenford.example', password: 'brackenford-owner-demo' };
const OWNER_TOKEN = 'lmk_9Td0r3ugY3KBUv96pqdkmKGIfO_1ZHUaruefiwWs';

async function freePort(): Promise<number> {
	const s = net.createServer();
	s.listen(0, '127.0.0.1');
	await once(s, 'listening');
	const port = (s.address() as net.AddressInfo).port;
	s.close();
	await once(s, 'close');
	return port;
}

/** A server of its own (`node server.js`), so that its memory and its ORIGIN are the test's. */
async function startServer(env: Record<string, string>, port?: number): Promise<{ child: ChildProcess; port: number; stop: () => Promise<void> }> {
	port ??= await freePort();
	const child = spawn('node', ['server.js'], {
		env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', BODY_SIZE_LIMIT: 'Infinity', LAPMARK_DEMO: '1', ...env, ...(env.ORIGIN ? {} : { ORIGIN: `http://127.0.0.1:${port}` }) },
		stdio: ['ignore', 'ignore', 'inherit']
	});
	const exited = once(child, 'exit');
	for (let i = 0; i < 150; i++) {
		if (await fetch(`http://127.0.0.1:${port}/api/health`).then((r) => r.ok).catch(() => false)) break;
		await new Promise((r) => setTimeout(r, 200));
	}
	return {
		child,
		port,
		stop: async () => {
			if (child.exitCode === null && child.signalCode === null) child.kill('SIGTERM');
			await exited;
		}
	};
}

/** Resident memory of a process, in MB (Linux). */
function rssMb(pid: number): number {
	const kb = Number(/VmRSS:\s+(\d+)/.exec(readFileSync(`/proc/${pid}/status`, 'utf8'))?.[1]);
	return kb / 1024;
}

interface Answer {
	status: number | null;
	body: string;
	error: string | null;
	continued: boolean;
}

/** Streams `total` bytes of `chunk` (repeated) as a chunked body, stopping once the server
 * answers; resolves with what the client read: a status, or the socket error it got instead. */
function streamBody(port: number, path: string, headers: Record<string, string>, first: string, chunk: string, total: number): Promise<Answer> {
	return new Promise((resolve) => {
		const out: Answer = { status: null, body: '', error: null, continued: false };
		const req = http.request({ host: '127.0.0.1', port, method: 'POST', path, headers });
		let sent = 0;
		let answered = false;
		const pump = () => {
			if (sent === 0) {
				req.write(first);
				sent += first.length;
			}
			while (!answered && sent < total) {
				sent += chunk.length;
				if (!req.write(chunk)) {
					req.once('drain', pump);
					return;
				}
			}
			if (!answered) req.end();
		};
		req.on('response', (res) => {
			answered = true;
			out.status = res.statusCode ?? null;
			res.setEncoding('utf8');
			res.on('data', (c: string) => (out.body += c));
			res.on('end', () => {
				req.destroy();
				resolve(out);
			});
			res.on('error', () => resolve(out));
		});
		req.on('error', (e: NodeJS.ErrnoException) => {
			out.error = e.code ?? e.message;
			if (!answered) resolve(out);
		});
		if (headers.expect === '100-continue') {
			req.on('continue', () => {
				out.continued = true;
				pump();
			});
			req.flushHeaders();
		} else pump();
	});
}

function expectSecurityHeaders(res: Response, where: string) {
	expect(res.headers.get('x-content-type-options'), where).toBe('nosniff');
	expect(res.headers.get('referrer-policy'), where).toBe('strict-origin-when-cross-origin');
	expect(res.headers.get('x-frame-options'), where).toBe('DENY');
	expect(res.headers.get('content-security-policy'), where).toContain("frame-ancestors 'none'");
}

describe('security headers on every response (the shared test server)', () => {
	it('are on a page, an API answer, a static file, a 404 page, a 404 of the API and an error', async () => {
		const cases: [string, RequestInit, number][] = [
			['/signin', {}, 200],
			['/api/v1/me', { headers: { authorization: `Bearer ${OWNER_TOKEN}` } }, 200],
			['/favicon.svg', {}, 200],
			['/no-such-page', {}, 404],
			['/api/v1/no-such-route', { headers: { authorization: `Bearer ${OWNER_TOKEN}` } }, 404],
			['/api/v1/stats/distribution?measurement=clearance&from=9999-12-31', { headers: { authorization: `Bearer ${OWNER_TOKEN}` } }, 400]
		];
		for (const [path, init, status] of cases) {
			const res = await fetch(baseURL + path, { ...init, redirect: 'manual' });
			expect(res.status, path).toBe(status);
			expectSecurityHeaders(res, path);
			// Plain http: no HSTS (it would pin a name to https that does not serve it).
			expect(res.headers.get('strict-transport-security'), path).toBeNull();
			await res.arrayBuffer();
		}
		// A page keeps SvelteKit's full policy, frame-ancestors included.
		const page = await fetch(`${baseURL}/signin`);
		expect(page.headers.get('content-security-policy')).toContain("script-src 'self'");
	});
});

describe('a server whose ORIGIN is https', () => {
	let server: Awaited<ReturnType<typeof startServer>>;
	beforeAll(async () => {
		server = await startServer({ ORIGIN: 'https://lapmark.test.example' });
	});
	afterAll(async () => server?.stop());

	it('sends HSTS on pages, API answers and static files', async () => {
		for (const path of ['/signin', '/api/health', '/favicon.svg']) {
			const res = await fetch(`http://127.0.0.1:${server.port}${path}`, { redirect: 'manual' });
			expect(res.headers.get('strict-transport-security'), path).toBe('max-age=31536000; includeSubDomains');
			expectSecurityHeaders(res, path);
			await res.arrayBuffer();
		}
	});
});

describe('a server whose ORIGIN says localhost, opened at 127.0.0.1', () => {
	let server: Awaited<ReturnType<typeof startServer>>;
	let origin: string;
	let other: string;
	const holder = sharedBrowser();
	beforeAll(async () => {
		const port = await freePort();
		origin = `http://localhost:${port}`;
		other = `http://127.0.0.1:${port}`;
		server = await startServer({ ORIGIN: origin, LAPMARK_UPLOAD_LIMIT_MB: '1' }, port);
	});
	afterAll(async () => server?.stop());

	it('sends the other loopback name to ORIGIN before any form is shown, and signs in there', async () => {
		const res = await fetch(`${other}/signin?redirectTo=%2Fheads`, { redirect: 'manual' });
		expect(res.status).toBe(307);
		expect(res.headers.get('location')).toBe(`${origin}/signin?redirectTo=%2Fheads`);

		const context = await holder.browser.newContext();
		const page = await context.newPage();
		await page.goto(`${other}/signin`);
		expect(new URL(page.url()).origin).toBe(origin);
		await page.getByLabel('E-mail address').fill(OWNER.email);
		await page.getByLabel('Password').fill(OWNER.password);
		await page.getByRole('button', { name: 'Sign in' }).click();
		await page.waitForURL((url) => !url.pathname.startsWith('/signin'));
		expect(new URL(page.url()).origin).toBe(origin);
		await expect(page.getByTestId('user-name').first().textContent()).resolves.toBeTruthy();
		await context.close();
	});

	it('answers a cross-site form with a 403 that says why, as a page, as JSON and on the form', async () => {
		const form = { 'content-type': 'application/x-www-form-urlencoded' };
		const pageAnswer = await fetch(`${other}/signin?/password`, { method: 'POST', headers: { ...form, origin: 'http://evil.example', accept: 'text/html' }, body: 'email=a%40b.example&password=x' });
		expect(pageAnswer.status).toBe(403);
		const html = await pageAnswer.text();
		expect(html).toContain(`This form was sent from http://evil.example, but Lapmark is served at ${origin}.`);

		const enhanced = await fetch(`${other}/signin?/password`, {
			method: 'POST',
			headers: { ...form, origin: other, accept: 'application/json', 'x-sveltekit-action': 'true' },
			body: 'email=a%40b.example&password=x'
		});
		expect(enhanced.status).toBe(403);
		expect(await enhanced.json()).toEqual({
			type: 'error',
			error: { message: `This form was sent from ${other}, but Lapmark is served at ${origin}. Open ${origin}/signin and send it again.` }
		});

		// In the browser: the sign-in page opened under a third name of this machine (chromium
		// resolves *.localhost to loopback, as a proxy's name would reach it): the enhanced form is
		// refused, and the person reads why instead of an emptied form.
		const context = await holder.browser.newContext();
		const page = await context.newPage();
		const third = `http://edge.localhost:${server.port}`;
		await page.goto(`${third}/signin`);
		await page.getByLabel('E-mail address').fill(OWNER.email);
		await page.getByLabel('Password').fill(OWNER.password);
		await page.getByRole('button', { name: 'Sign in' }).click();
		await page.getByText(`This form was sent from ${third}, but Lapmark is served at ${origin}.`).waitFor();
		await context.close();
	});

	it('refuses a 5 MB sign-in form with a 413 that says why, without taking it into memory', async () => {
		const pid = server.child.pid as number;
		const before = rssMb(pid);
		const big = 'email=' + 'a'.repeat(5 * 1024 * 1024);
		const res = await fetch(`${other}/signin?/password`, { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded', origin, accept: 'text/html' }, body: big });
		expect(res.status).toBe(413);
		expect(await res.text()).toContain('The request body is larger than 1 MB');

		// The same without Content-Length: 200 MB streamed in chunks, counted while read.
		const streamed = await streamBody(server.port, '/signin?/password', { 'content-type': 'application/x-www-form-urlencoded', origin, accept: 'text/html' }, 'email=', 'a'.repeat(64 * 1024), 200 * 1024 * 1024);
		expect(streamed.status).toBe(413);
		expect(streamed.body).toContain('The request body is larger than 1 MB');
		expect(rssMb(pid) - before).toBeLessThan(50);
	});

	it('delivers the 413 of an import over its limit, chunked after 100 Continue or not, and by Content-Length before it', async () => {
		const lines = readFileSync(new URL('../../datasets/demo/wide-mm.csv', import.meta.url), 'utf8').trim().split('\n');
		const head = lines[0] + '\n';
		const rows = lines.slice(1).join('\n') + '\n';
		const headers = { authorization: `Bearer ${OWNER_TOKEN}`, 'content-type': 'text/csv' };
		const path = '/api/v1/imports?dryRun=1&onReject=skip';

		const afterContinue = await streamBody(server.port, path, { ...headers, expect: '100-continue' }, head, rows, 30 * 1024 * 1024);
		expect(afterContinue.error).toBeNull();
		expect(afterContinue.continued).toBe(true);
		expect(afterContinue.status).toBe(413);
		expect(JSON.parse(afterContinue.body)).toEqual({ message: 'The file is larger than the limit of 1 MB.' });

		const chunked = await streamBody(server.port, path, headers, head, rows, 30 * 1024 * 1024);
		expect(chunked.status).toBe(413);
		expect(JSON.parse(chunked.body).message).toBe('The file is larger than the limit of 1 MB.');

		// Content-Length over the limit with Expect: the 413 comes instead of 100 Continue.
		const declared = await new Promise<Answer>((resolve) => {
			const out: Answer = { status: null, body: '', error: null, continued: false };
			const req = http.request({ host: '127.0.0.1', port: server.port, method: 'POST', path, headers: { ...headers, expect: '100-continue', 'content-length': String(3 * 1024 * 1024) } });
			req.on('continue', () => (out.continued = true));
			req.on('response', (res) => {
				out.status = res.statusCode ?? null;
				res.setEncoding('utf8');
				res.on('data', (c: string) => (out.body += c));
				res.on('end', () => {
					req.destroy();
					resolve(out);
				});
			});
			req.on('error', (e: NodeJS.ErrnoException) => {
				out.error = e.code ?? e.message;
				if (out.status === null) resolve(out);
			});
			req.flushHeaders();
		});
		expect(declared.continued).toBe(false);
		expect(declared.status).toBe(413);
		expect(JSON.parse(declared.body).message).toBe('The file is larger than the limit of 1 MB.');

		// The server still answers on new connections afterwards.
		expect((await fetch(`${other}/api/health`, { redirect: 'manual' })).status).toBe(307);
	});

	it('answers a 100 kB query string with a 414 that names the parameter', async () => {
		const res = await fetch(`${baseURL}/api/v1/readings?customer=${'x'.repeat(100_000)}`, { headers: { authorization: `Bearer ${OWNER_TOKEN}` } });
		expect(res.status).toBe(414);
		const body = await res.json();
		expect(body.message).toContain('The longest parameter is customer (100009 characters)');
		expectSecurityHeaders(res, 'a 414');
	});
});

describe('bad input is a 4xx that names the parameter (the shared test server)', () => {
	const bearer = { authorization: `Bearer ${OWNER_TOKEN}` };
	const get = async (path: string, headers: Record<string, string> = bearer) => {
		const res = await fetch(baseURL + path, { headers, redirect: 'manual' });
		return { status: res.status, location: res.headers.get('location'), text: await res.text() };
	};

	it('never redirects off the site, and refuses a redirectTo with a tab or a line break', async () => {
		const viewer = new Client(baseURL);
		await viewer.signIn('viewer@brackenford.example', 'brackenford-viewer-demo');
		expect(viewer.signedIn).toBe(true);
		for (const bad of ['/%09/evil.example', '/%0A', '//evil.example', '/%5Cevil.example', 'https://evil.example/']) {
			const res = await viewer.get(`/signin?redirectTo=${bad}`);
			expect(res.status, bad).toBe(400);
			expect(res.headers.get('location'), bad).toBeNull();
			expect(await res.text(), bad).toContain('redirectTo must be a path on this site, such as /heads');
		}
		const ok = await viewer.get('/signin?redirectTo=%2Fheads%3Fpage%3D2');
		expect(ok.status).toBe(303);
		expect(ok.headers.get('location')).toBe('/heads?page=2');
	});

	it('refuses NUL and other control characters in text parameters, JSON and CSV headers', async () => {
		for (const [name, value] of [
			['customer', 'a%00b'],
			['machinist', '%00'],
			['customer', '%1B%5B2J']
		]) {
			const r = await get(`/api/v1/stats/distribution?measurement=clearance&${name}=${value}`);
			expect(r.status, name).toBe(400);
			expect(JSON.parse(r.text).message).toBe(`${name} must not contain control characters (such as a NUL byte or a line break)`);
		}
		const headers = await fetch(`${baseURL}/api/v1/imports/headers`, {
			method: 'POST',
			headers: { ...bearer, 'content-type': 'application/json' },
			body: JSON.stringify({ headers: ['head_serial', 'fam\u0000ily'] })
		});
		expect(headers.status).toBe(400);
		expect((await headers.json()).message).toBe('headers.1: headers must not contain control characters (such as a NUL byte or a line break)');
	});

	it('refuses days outside the calendar the app keeps, and numbers whose sums overflow', async () => {
		const far = await get('/api/v1/stats/distribution?measurement=clearance&from=9999-12-31');
		expect(far.status).toBe(400);
		expect(JSON.parse(far.text).message).toBe('from must be a day between 1900-01-01 and 2999-12-31');
		const readings = await get('/api/v1/readings?to=9999-12-31&format=json');
		expect(readings.status).toBe(400);
		expect(JSON.parse(readings.text).message).toBe('to must be a day between 1900-01-01 and 2999-12-31');

		const sums = await fetch(`${baseURL}/api/v1/stats/describe`, { method: 'POST', headers: { ...bearer, 'content-type': 'application/json' }, body: '[1e308,-1e308,1e308]' });
		expect(sums.status).toBe(400);
		expect((await sums.json()).message).toBe('body: values are too large to sum: keep them within 1e+150 of each other and their total finite');
	});
});
