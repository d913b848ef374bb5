// Bad input to sign-in, links and tokens gets a clear answer and changes nothing.
import { sql as raw } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { newApiToken, sha256Hex } from '../../src/lib/server/auth/tokens';
import { withSystem } from '../../src/lib/server/db/scope';
import { apiTokens } from '../../src/lib/server/db/schema';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { firstLink, waitForMail } from '../helpers/mail';
import { shopWithPeople } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
let ctx: Awaited<ReturnType<typeof shopWithPeople>>;

beforeAll(async () => {
	ctx = await shopWithPeople(db, 'authhttp');
});
afterAll(() => sql.end());

const body = async (res: Response) => res.text();

describe('sign-in answers', () => {
	it('wrong password and unknown address get the same answer', async () => {
		const wrong = await new Client(baseURL).signIn(ctx.people.viewer.email, 'wrong password');
		const unknown = await new Client(baseURL).signIn('no-such-person@test.example', 'wrong password');
		expect(wrong.status).toBe(400);
		expect(unknown.status).toBe(400);
		expect(await body(wrong)).toContain('That e-mail address and password do not match an account.');
		expect(await body(unknown)).toContain('That e-mail address and password do not match an account.');
	});

	it.each([
		['a malformed address', 'not-an-address', 'That does not look like an e-mail address.'],
		['an over-long address', `${'a'.repeat(250)}@test.example`, 'That e-mail address is too long (254 characters at most).'],
		['an empty address', '', 'Enter your e-mail address.']
	])('refuses %s', async (_n, email, message) => {
		const res = await new Client(baseURL).signIn(email, 'whatever');
		expect(res.status).toBe(400);
		expect(await body(res)).toContain(message);
	});

	it('limits failed attempts per address and client: 10, then even the right password waits', async () => {
		const person = ctx.people.engineer;
		for (let i = 0; i < 10; i++) expect((await new Client(baseURL).signIn(person.email, `wrong ${i}`)).status).toBe(400);
		const blocked = await new Client(baseURL).signIn(person.email, person.password);
		expect(blocked.status).toBe(429);
		expect(await body(blocked)).toMatch(/Too many sign-in attempts\. Wait (29|30) seconds and try again\./);
		// Another address from the same client still signs in.
		const other = new Client(baseURL);
		expect([302, 303]).toContain((await other.signIn(ctx.people.owner.email, ctx.people.owner.password)).status);
	});
});

describe('links', () => {
	it('a password reset link works once and not after it expires', async () => {
		const person = ctx.people.machinist;
		const since = Date.now() - 1000;
		const c = new Client(baseURL);
		const res = await c.request('POST', '/signin/forgot', { form: { email: person.email } });
		expect(res.status).toBe(200);
		const link = firstLink(await waitForMail(person.email, /Reset your Lapmark password/, since));
		const path = new URL(link).pathname;
		const mismatch = await c.request('POST', path, { form: { password: 'a brand new password', confirm: 'something else' } });
		expect(mismatch.status).toBe(400);
		expect(await body(mismatch)).toContain('The two passwords differ.');
		const ok = await c.request('POST', path, { form: { password: 'a brand new password', confirm: 'a brand new password' } });
		expect(ok.status).toBe(303);
		const again = await c.request('POST', path, { form: { password: 'another new password', confirm: 'another new password' } });
		expect(again.status).toBe(410);
		expect(await body(again)).toContain('This link has expired or was already used.');
		expect([302, 303]).toContain((await new Client(baseURL).signIn(person.email, 'a brand new password')).status);

		// An expired one.
		const since2 = Date.now() - 1000;
		await c.request('POST', '/signin/forgot', { form: { email: person.email } });
		const link2 = new URL(firstLink(await waitForMail(person.email, /Reset your Lapmark password/, since2))).pathname;
		await withSystem(db, (tx) => tx.execute(raw`update password_resets set expires_at = now() - interval '1 minute' where used_at is null`));
		const late = await c.request('POST', link2, { form: { password: 'too late password', confirm: 'too late password' } });
		expect(late.status).toBe(410);
	});

	it('the forgot-password form answers the same for an unknown address', async () => {
		const res = await new Client(baseURL).request('POST', '/signin/forgot', { form: { email: 'nobody-at-all@test.example' } });
		expect(res.status).toBe(200);
		expect(await body(res)).toContain('If nobody-at-all@test.example has a Lapmark account');
	});
});

describe('API tokens', () => {
	async function token(over: Partial<typeof apiTokens.$inferInsert>) {
		const t = newApiToken();
		await withSystem(db, (tx) =>
			tx.insert(apiTokens).values({ shopId: ctx.shop.id, userId: ctx.people.engineer.userId, name: 'test', prefix: t.slice(0, 10), tokenHash: sha256Hex(t), role: 'engineer', ...over })
		);
		return t;
	}
	const me = (t: string) => fetch(`${baseURL}/api/v1/me`, { headers: { authorization: `Bearer ${t}` } });

	const lastUsed = async (t: string) => {
		const [row] = await withSystem(db, (tx) =>
			tx.execute<{ at: string | null }>(raw`select last_used_at::text as at from api_tokens where token_hash = ${sha256Hex(t)}`)
		);
		return row.at;
	};

	it('a live token works and records its use', async () => {
		const t = await token({});
		expect(await lastUsed(t)).toBeNull();
		const res = await me(t);
		expect(res.status).toBe(200);
		expect(await res.json()).toMatchObject({ role: 'engineer', via: 'token', shop: { id: ctx.shop.id } });
		expect(await lastUsed(t)).not.toBeNull();
	});

	it('records a token’s use at most once a minute', async () => {
		const t = await token({});
		await me(t);
		const first = await lastUsed(t);
		expect((await me(t)).status).toBe(200);
		expect(await lastUsed(t)).toBe(first);
		await withSystem(db, (tx) => tx.execute(raw`update api_tokens set last_used_at = now() - interval '2 minutes' where token_hash = ${sha256Hex(t)}`));
		const stale = await lastUsed(t);
		expect((await me(t)).status).toBe(200);
		expect(Date.parse((await lastUsed(t))!)).toBeGreaterThan(Date.parse(stale!));
	});

	it('refuses the token of someone who has left the shop, and records no use', async () => {
		const other = await shopWithPeople(db, 'authhttp-left');
		const t = await token({ userId: other.people.engineer.userId });
		const res = await me(t);
		expect(res.status).toBe(401);
		expect((await res.json()).message).toBe('The token is unknown, expired or revoked.');
		expect(await lastUsed(t)).toBeNull();
	});

	it.each([
		['an expired token', { expiresAt: new Date(Date.now() - 60_000) }],
		['a revoked token', { revokedAt: new Date() }]
	])('refuses %s with 401', async (_n, over) => {
		const t = await token(over);
		const res = await me(t);
		expect(res.status).toBe(401);
		expect((await res.json()).message).toBe('The token is unknown, expired or revoked.');
		expect(await lastUsed(t)).toBeNull();
	});

	it.each([
		['a malformed token', 'Bearer lmk_short', 'That is not a Lapmark API token.'],
		['an unknown token', `Bearer ${newApiToken()}`, 'The token is unknown, expired or revoked.'],
		['another scheme', 'Basic abc', 'The Authorization header must be "Bearer <token>".']
	])('refuses %s with 401', async (_n, header, message) => {
		const res = await fetch(`${baseURL}/api/v1/me`, { headers: { authorization: header } });
		expect(res.status).toBe(401);
		expect((await res.json()).message).toBe(message);
	});

	it('a token never carries more than its creator holds today', async () => {
		const t = await token({ userId: ctx.people.machinist.userId, role: 'owner' });
		expect((await (await me(t)).json()).role).toBe('machinist');
	});
});

describe('security headers', () => {
	it('pages carry a Content-Security-Policy and session cookies are HttpOnly and SameSite=Lax', async () => {
		const page = await fetch(`${baseURL}/signin`);
		expect(page.headers.get('content-security-policy')).toMatch(/default-src 'self'/);
		const c = new Client(baseURL);
		const res = await c.signIn(ctx.people.viewer.email, ctx.people.viewer.password);
		const cookie = res.headers.getSetCookie().find((l) => l.includes('session-token'))!;
		expect(cookie).toMatch(/HttpOnly/i);
		expect(cookie).toMatch(/SameSite=Lax/i);
	});

	it('a form post from another origin is refused', async () => {
		const res = await new Client(baseURL).request('POST', '/signin?/password', {
			form: { email: ctx.people.viewer.email, password: ctx.people.viewer.password },
			headers: { origin: 'https://elsewhere.example' }
		});
		expect(res.status).toBe(403);
	});
});
