// Sign-in as an attacker tries it, over plain HTTP against the built app: forged host headers,
// Auth.js's link endpoint called directly, parallel password guesses, guesses meant to lock
// someone out, and telling known addresses from unknown ones by the answer or its timing.
// Requests go out from different loopback addresses (127.0.0.x) where a test needs different
// clients: the server sees them as different client addresses, with no proxy header trusted.
import http from 'node:http';
import { sql as raw } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { createHash, randomBytes } from 'node:crypto';
import { withSystem } from '../../src/lib/server/db/scope';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { firstLink, waitForMail } from '../helpers/mail';
import { shopWithPeople, uniqueEmail } from '../helpers/people';

const baseURL = inject('baseURL');
const base = new URL(baseURL);
const { db, sql } = testDb();
let ctx: Awaited<ReturnType<typeof shopWithPeople>>;

beforeAll(async () => {
	ctx = await shopWithPeople(db, 'authabuse');
});
afterAll(() => sql.end());

interface Answer {
	status: number;
	location: string | null;
	body: string;
	cookies: string[];
	ms: number;
}

/** One request from a chosen local address, with any headers (Host included). */
function send(method: string, path: string, opts: { form?: Record<string, string>; from?: string; headers?: Record<string, string>; cookie?: string } = {}): Promise<Answer> {
	const body = opts.form ? new URLSearchParams(opts.form).toString() : undefined;
	const headers: Record<string, string> = { origin: baseURL, accept: 'text/html', ...opts.headers };
	if (body !== undefined) {
		headers['content-type'] = 'application/x-www-form-urlencoded';
		headers['content-length'] = String(Buffer.byteLength(body));
	}
	if (opts.cookie) headers.cookie = opts.cookie;
	const t0 = performance.now();
	return new Promise((resolve, reject) => {
		const req = http.request({ host: base.hostname, port: base.port, path, method, headers, localAddress: opts.from ?? '127.0.0.1', agent: false }, (res) => {
			let text = '';
			res.setEncoding('utf8');
			res.on('data', (d) => (text += d));
			res.on('end', () =>
				resolve({ status: res.statusCode ?? 0, location: (res.headers.location as string | undefined) ?? null, body: text, cookies: res.headers['set-cookie'] ?? [], ms: performance.now() - t0 })
			);
		});
		req.on('error', reject);
		req.end(body);
	});
}

let nextClient = 10;
/** A loopback address no other test in this file has used. */
function freshClient() {
	const n = nextClient++;
	return `127.0.${Math.floor(n / 250) + 1}.${(n % 250) + 2}`;
}

const outbox = (to: string, kind: string) =>
	withSystem(db, async (tx) => (await tx.execute<{ n: number }>(raw`select count(*)::int as n from mail_outbox where "to" = ${to} and kind = ${kind}`))[0].n);
const usersNamed = (email: string) =>
	withSystem(db, async (tx) => (await tx.execute<{ n: number }>(raw`select count(*)::int as n from "user" where email = ${email}`))[0].n);

/** Waits until the server has handled every link or reset request for `email`. */
async function settled(email: string) {
	const pending = async () =>
		withSystem(db, async (tx) => (await tx.execute<{ n: number }>(raw`select count(*)::int as n from auth_mail_requests where email = ${email} and done_at is null`))[0].n);
	for (let i = 0; i < 100 && (await pending()) > 0; i++) await new Promise((r) => setTimeout(r, 100));
	expect(await pending()).toBe(0);
}

const FORGED = { host: 'evil.example', 'x-forwarded-host': 'evil.example', 'x-forwarded-proto': 'https' };

describe('links are built from ORIGIN only', () => {
	it('a sign-in link asked for with a forged host points at ORIGIN', async () => {
		const person = ctx.people.viewer;
		const since = Date.now() - 1000;
		const res = await send('POST', '/signin?/link', { form: { email: person.email, redirectTo: '/' }, headers: FORGED, from: freshClient() });
		expect(res.status).toBe(303);
		expect(res.location).toBe('/signin/check-email');
		const link = new URL(firstLink(await waitForMail(person.email, /sign-in link/, since)));
		expect(link.host).toBe(base.host);
		expect(link.protocol).toBe('http:');
		expect(link.pathname).toBe('/auth/callback/nodemailer');
	});

	it('a password reset link asked for with a forged host points at ORIGIN', async () => {
		const person = ctx.people.machinist;
		const since = Date.now() - 1000;
		const res = await send('POST', '/signin/forgot', { form: { email: person.email }, headers: FORGED, from: freshClient() });
		expect(res.status).toBe(200);
		const link = new URL(firstLink(await waitForMail(person.email, /Reset your Lapmark password/, since)));
		expect(link.host).toBe(base.host);
		expect(link.pathname).toMatch(/^\/signin\/reset\//);
	});

	it('the redirect after a password sign-in stays on ORIGIN', async () => {
		const res = await send('POST', '/signin?/password', { form: { email: ctx.people.viewer.email, password: ctx.people.viewer.password, redirectTo: '/heads' }, headers: FORGED, from: freshClient() });
		expect(res.status).toBe(302);
		expect(new URL(res.location!, baseURL).host).toBe(base.host);
		expect(new URL(res.location!, baseURL).pathname).toBe('/heads');
	});
});

describe('the e-mail-link endpoint of Auth.js, called directly', () => {
	async function direct(email: string, from: string) {
		// @auth/sveltekit leaves CSRF to SvelteKit's origin check (its /auth/csrf answers 404);
		// a token is sent along when there is one, as a script would.
		const csrf = await send('GET', '/auth/csrf', { from, headers: { accept: 'application/json' } });
		const csrfToken = csrf.status === 200 ? (JSON.parse(csrf.body) as { csrfToken: string }).csrfToken : '';
		const cookie = csrf.cookies.map((c) => c.split(';')[0]).join('; ');
		return send('POST', '/auth/signin/nodemailer', { form: { email, csrfToken, callbackUrl: `${baseURL}/` }, cookie, from });
	}

	it('sends nothing and creates nobody for an unknown address, and answers as for a known one', async () => {
		const unknown = uniqueEmail('nobody');
		const from = freshClient();
		const a = await direct(unknown, from);
		const b = await direct(ctx.people.owner.email, from);
		expect(a.status).toBe(302);
		expect(b.status).toBe(302);
		expect(a.location).toBe(`${baseURL}/auth/verify-request?provider=nodemailer&type=email`);
		expect(b.location).toBe(a.location);
		await settled(unknown);
		await settled(ctx.people.owner.email);
		expect(await outbox(unknown, 'sign_in_link')).toBe(0);
		expect(await usersNamed(unknown)).toBe(0);
		expect(await outbox(ctx.people.owner.email, 'sign_in_link')).toBe(1);
	});

	it('holds to the limit: ten links, then no more mail', async () => {
		const person = ctx.people.engineer;
		const from = freshClient();
		for (let i = 0; i < 12; i++) expect((await direct(person.email, from)).status).toBe(302);
		await settled(person.email);
		expect(await outbox(person.email, 'sign_in_link')).toBe(10);
	});

	it('mails one address at most 20 links or resets an hour, from all clients together', async () => {
		const { people } = await shopWithPeople(db, 'authabuse-flood');
		const email = people.viewer.email;
		for (let i = 0; i < 20; i++) expect((await direct(email, freshClient())).status).toBe(302);
		await settled(email);
		expect(await outbox(email, 'sign_in_link')).toBe(20);
		const link = await send('POST', '/signin?/link', { form: { email, redirectTo: '/' }, from: freshClient() });
		expect([link.status, link.location]).toEqual([303, '/signin/check-email']);
		const reset = await send('POST', '/signin/forgot', { form: { email }, from: freshClient() });
		expect(reset.status).toBe(200);
		await settled(email);
		expect(await outbox(email, 'sign_in_link')).toBe(20);
		expect(await outbox(email, 'password_reset')).toBe(0);
	});

	it('a valid link for an address without an account creates no account', async () => {
		// As if a link had been made for a stranger: the token stored the way Auth.js stores it.
		const stranger = uniqueEmail('stranger');
		const token = randomBytes(16).toString('hex');
		const hashed = createHash('sha256').update(`${token}${process.env.AUTH_SECRET}`).digest('hex');
		await withSystem(db, (tx) => tx.execute(raw`insert into "verificationToken" (identifier, token, expires) values (${stranger}, ${hashed}, now() + interval '1 hour')`));
		const res = await send('GET', `/auth/callback/nodemailer?${new URLSearchParams({ token, email: stranger, callbackUrl: `${baseURL}/` })}`, { from: freshClient() });
		expect(res.status).toBe(302);
		expect(res.location).toMatch(/\/signin\?error=/);
		expect(res.cookies.some((c) => c.includes('session-token'))).toBe(false);
		expect(await usersNamed(stranger)).toBe(0);
	});
});

describe('the password rate limit', () => {
	it('30 parallel wrong passwords for one address: at most 10 are checked', async () => {
		const person = ctx.people.owner;
		const from = freshClient();
		const answers = await Promise.all(
			Array.from({ length: 30 }, (_, i) => send('POST', '/signin?/password', { form: { email: person.email, password: `wrong guess ${i}` }, from }))
		);
		const wrong = answers.filter((a) => a.status === 400 && a.body.includes('That e-mail address and password do not match an account.')).length;
		const tooMany = answers.filter((a) => a.status === 429 && a.body.includes('Too many sign-in attempts.')).length;
		expect(wrong + tooMany).toBe(30);
		expect(wrong).toBeLessThanOrEqual(10);
		expect(tooMany).toBeGreaterThanOrEqual(20);
	});

	it('an attacker at one client cannot lock the owner at another out', async () => {
		const { people } = await shopWithPeople(db, 'authabuse-lock');
		const attacker = freshClient();
		const statuses: number[] = [];
		for (let i = 0; i < 14; i++) statuses.push((await send('POST', '/signin?/password', { form: { email: people.owner.email, password: `guess ${i}` }, from: attacker })).status);
		expect(statuses).toEqual([...Array(10).fill(400), 429, 429, 429, 429]);
		// The owner, elsewhere, signs in at once.
		const owner = await send('POST', '/signin?/password', { form: { email: people.owner.email, password: people.owner.password, redirectTo: '/' }, from: freshClient() });
		expect(owner.status).toBe(302);
		expect(owner.cookies.some((c) => c.includes('session-token'))).toBe(true);
	});

	it('backs off with a growing delay instead of a hard lock', async () => {
		const { people } = await shopWithPeople(db, 'authabuse-backoff');
		const from = freshClient();
		const guess = (i: number) => send('POST', '/signin?/password', { form: { email: people.viewer.email, password: `guess ${i}` }, from });
		for (let i = 0; i < 10; i++) expect((await guess(i)).status).toBe(400);
		const first = await guess(10);
		expect(first.status).toBe(429);
		expect(first.body).toMatch(/Too many sign-in attempts\. Wait (29|30) seconds and try again\./);
		// 40 seconds later (the attempts moved back in time), one more guess goes through …
		await withSystem(db, (tx) => tx.execute(raw`update sign_in_attempts set at = at - interval '40 seconds' where email = ${people.viewer.email}`));
		expect((await guess(11)).status).toBe(400);
		// … and the next wait is twice as long.
		const second = await guess(12);
		expect(second.status).toBe(429);
		expect(second.body).toMatch(/Wait (59|60) seconds and try again\./);
	});
});

describe('known and unknown addresses get the same answer', () => {
	const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

	it('the forgot-password form: same status, same page, about the same time', async () => {
		const known = ctx.people.viewer.email;
		const k: Answer[] = [];
		const u: Answer[] = [];
		// Warm the route first; then alternate, each request from a client of its own (so the
		// limit does not step in) and to an address of its own kind.
		await send('POST', '/signin/forgot', { form: { email: uniqueEmail('warm') }, from: freshClient() });
		for (let i = 0; i < 15; i++) {
			k.push(await send('POST', '/signin/forgot', { form: { email: known }, from: freshClient() }));
			u.push(await send('POST', '/signin/forgot', { form: { email: `nobody-${i}@test.example` }, from: freshClient() }));
		}
		expect(new Set([...k, ...u].map((a) => a.status))).toEqual(new Set([200]));
		expect(k[0].body.replace(known, 'X')).toContain('If X has a Lapmark account');
		expect(u[0].body.replace('nobody-0@test.example', 'X')).toContain('If X has a Lapmark account');
		const [mk, mu] = [median(k.map((a) => a.ms)), median(u.map((a) => a.ms))];
		console.log(`forgot password, median ms: known ${mk.toFixed(1)}, unknown ${mu.toFixed(1)}`);
		expect(Math.max(mk, mu) / Math.min(mk, mu)).toBeLessThan(2);
	});

	it('the sign-in link form: same status, same location, about the same time', async () => {
		const known = ctx.people.machinist.email;
		const k: Answer[] = [];
		const u: Answer[] = [];
		await send('POST', '/signin?/link', { form: { email: uniqueEmail('warm'), redirectTo: '/' }, from: freshClient() });
		for (let i = 0; i < 15; i++) {
			k.push(await send('POST', '/signin?/link', { form: { email: known, redirectTo: '/' }, from: freshClient() }));
			u.push(await send('POST', '/signin?/link', { form: { email: `nobody-link-${i}@test.example`, redirectTo: '/' }, from: freshClient() }));
		}
		for (const a of [...k, ...u]) {
			expect(a.status).toBe(303);
			expect(a.location).toBe('/signin/check-email');
		}
		const [mk, mu] = [median(k.map((a) => a.ms)), median(u.map((a) => a.ms))];
		console.log(`sign-in link, median ms: known ${mk.toFixed(1)}, unknown ${mu.toFixed(1)}`);
		expect(Math.max(mk, mu) / Math.min(mk, mu)).toBeLessThan(2);
	});
});
