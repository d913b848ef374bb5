// Sessions end on the server: a cookie kept after sign-out, a password reset or change, or
// removal from the shop no longer works; a role change takes the old rights away at once; an
// idle or too old session is refused. HTTP against the built app, mail from the fake inbox.
import { sql as raw } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { withSystem } from '../../src/lib/server/db/scope';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { firstLink, waitForMail } from '../helpers/mail';
import { shopWithPeople } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
let ctx: Awaited<ReturnType<typeof shopWithPeople>>;

beforeAll(async () => {
	ctx = await shopWithPeople(db, 'sessions');
});
afterAll(() => sql.end());

async function signedIn(email: string, password: string) {
	const c = new Client(baseURL);
	const res = await c.signIn(email, password);
	expect(res.status).toBe(302);
	expect(c.signedIn).toBe(true);
	return c;
}

/** A second client holding the same cookies: what an attacker who copied the cookie has. */
function replay(c: Client) {
	const copy = new Client(baseURL);
	copy.cookies = new Map(c.cookies);
	return copy;
}

const me = (c: Client) => c.get('/api/v1/me', { accept: 'application/json' });

async function expectRefused(c: Client) {
	expect((await me(c)).status).toBe(401);
	const page = await c.get('/heads', { accept: 'text/html' });
	expect(page.status).toBe(303);
	expect(page.headers.get('location')).toBe('/signin?redirectTo=%2Fheads');
}

describe('ending sessions', () => {
	it('a cookie replayed after sign-out is refused', async () => {
		const c = await signedIn(ctx.people.viewer.email, ctx.people.viewer.password);
		const copy = replay(c);
		expect((await me(copy)).status).toBe(200);
		const out = await c.request('POST', '/signout', { form: { redirectTo: '/signin' } });
		expect(out.status).toBe(302);
		await expectRefused(copy);
	});

	it('signing out ends only that session', async () => {
		const a = await signedIn(ctx.people.viewer.email, ctx.people.viewer.password);
		const b = await signedIn(ctx.people.viewer.email, ctx.people.viewer.password);
		await a.request('POST', '/signout', { form: { redirectTo: '/signin' } });
		expect((await me(b)).status).toBe(200);
	});

	it('a password reset ends every session of that person', async () => {
		const person = ctx.people.machinist;
		const a = await signedIn(person.email, person.password);
		const b = await signedIn(person.email, person.password);
		expect((await me(a)).status).toBe(200);
		const since = Date.now() - 1000;
		expect((await new Client(baseURL).request('POST', '/signin/forgot', { form: { email: person.email } })).status).toBe(200);
		const path = new URL(firstLink(await waitForMail(person.email, /Reset your Lapmark password/, since))).pathname;
		const done = await new Client(baseURL).request('POST', path, { form: { password: 'a reset password here', confirm: 'a reset password here' } });
		expect(done.status).toBe(303);
		await expectRefused(replay(a));
		await expectRefused(replay(b));
		person.password = 'a reset password here';
		expect((await me(await signedIn(person.email, person.password))).status).toBe(200);
	});

	it('a password change ends every other session and keeps the one that made it', async () => {
		const person = ctx.people.engineer;
		const here = await signedIn(person.email, person.password);
		const elsewhere = await signedIn(person.email, person.password);
		const wrong = await here.request('POST', '/settings/password', { form: { current: 'not my password', password: 'a changed password', confirm: 'a changed password' } });
		expect(wrong.status).toBe(400);
		expect(await wrong.text()).toContain('That is not your current password.');
		expect((await me(elsewhere)).status).toBe(200);
		const res = await here.request('POST', '/settings/password', { form: { current: person.password, password: 'a changed password', confirm: 'a changed password' } });
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('Password changed. Your other session was signed out.');
		expect((await me(here)).status).toBe(200);
		await expectRefused(elsewhere);
		person.password = 'a changed password';
		expect((await me(await signedIn(person.email, 'a changed password'))).status).toBe(200);
	});
});

describe('membership changes reach sessions at once', () => {
	it('removal from the shop ends the removed person’s sessions', async () => {
		const { people } = await shopWithPeople(db, 'sessions-rm');
		const owner = await signedIn(people.owner.email, people.owner.password);
		const gone = await signedIn(people.machinist.email, people.machinist.password);
		expect((await gone.get('/heads', { accept: 'text/html' })).status).toBe(200);
		const res = await owner.request('POST', '/settings/members?/remove', { form: { userId: people.machinist.userId } });
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('Member removed.');
		await expectRefused(gone);
	});

	it('a role change takes the old rights away from the old cookie', async () => {
		const { people } = await shopWithPeople(db, 'sessions-role');
		const owner = await signedIn(people.owner.email, people.owner.password);
		const eng = await signedIn(people.engineer.email, people.engineer.password);
		expect((await eng.get('/explore', { accept: 'text/html' })).status).toBe(200);
		const res = await owner.request('POST', '/settings/members?/role', { form: { userId: people.engineer.userId, role: 'viewer' } });
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('Role changed.');
		expect((await eng.get('/explore', { accept: 'text/html' })).status).toBe(403);
		expect((await eng.get('/api/v1/readings?format=json', { accept: 'application/json' })).status).toBe(403);
		expect(await (await me(eng)).json()).toMatchObject({ role: 'viewer' });
	});
});

describe('lifetimes', () => {
	async function sessionRows(userId: string) {
		return withSystem(db, (tx) =>
			tx.execute<{ id: string; idle_h: number; max_d: number }>(raw`
				select id, round(extract(epoch from idle_expires_at - last_seen_at) / 3600)::int as idle_h,
					round(extract(epoch from expires_at - created_at) / 86400)::int as max_d
				from user_sessions where user_id = ${userId} and revoked_at is null order by created_at desc`)
		);
	}

	it('a session lives 12 hours idle and 14 days at most', async () => {
		const { people } = await shopWithPeople(db, 'sessions-life');
		await signedIn(people.viewer.email, people.viewer.password);
		const [row] = await sessionRows(people.viewer.userId);
		expect(row).toMatchObject({ idle_h: 12, max_d: 14 });
	});

	it.each([
		['idle too long', raw`idle_expires_at = now() - interval '1 second'`],
		['past its absolute end', raw`expires_at = now() - interval '1 second'`]
	])('a session %s is refused', async (_n, change) => {
		const { people } = await shopWithPeople(db, 'sessions-end');
		const c = await signedIn(people.viewer.email, people.viewer.password);
		expect((await me(c)).status).toBe(200);
		await withSystem(db, (tx) => tx.execute(raw`update user_sessions set ${change} where user_id = ${people.viewer.userId}`));
		await expectRefused(c);
	});
});
