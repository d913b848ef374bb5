// Public shop sign-up over HTTP: the form, the mailed link, the account that does not work
// before the link, the owner signed in with the shop's units and currency afterwards, and a
// second sign-up for a known address that answers the same and mails a note instead.
import { randomUUID } from 'node:crypto';
import { afterAll, describe, expect, inject, it } from 'vitest';
import type postgres from 'postgres';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { firstLink, waitForMail } from '../helpers/mail';

const baseURL = inject('baseURL');
const { sql } = testDb();
afterAll(() => sql.end());

const tag = randomUUID().slice(0, 8);
const email = `founder-${tag}@test.example`;
const password = 'a long enough password';
const shopName = `Harbour Head Works ${tag}`;
const form = { ownerName: 'Robin Founder', email, password, shopName, lengthUnit: 'in', distanceUnit: 'mi', currency: 'USD' };

/** One count, looking across shops as the sign-up itself does. */
async function count(query: (t: postgres.TransactionSql) => Promise<{ n: number }[]>): Promise<number> {
	const rows = await sql.begin(async (t) => {
		await t`select set_config('lapmark.system', 'on', true)`;
		return query(t);
	});
	return rows[0].n;
}
const usersWith = (address: string) => count((t) => t`select count(*)::int as n from "user" where email = ${address}`);
const shopsNamed = (name: string) => count((t) => t`select count(*)::int as n from shops where name = ${name}`);
const signupsOf = (address: string) => count((t) => t`select count(*)::int as n from shop_signups where email = ${address}`);

describe('shop sign-up', () => {
	it('shows the form with the units and currencies to choose', async () => {
		const res = await new Client(baseURL).get('/signup');
		expect(res.status).toBe(200);
		const html = await res.text();
		for (const field of ['ownerName', 'email', 'password', 'shopName', 'lengthUnit', 'distanceUnit', 'currency']) expect(html).toContain(`name="${field}"`);
		for (const code of ['EUR', 'USD', 'GBP', 'CAD', 'AUD']) expect(html).toContain(`value="${code}"`);
	});

	it('refuses bad input with a message naming the field, and keeps nothing', async () => {
		const c = new Client(baseURL);
		const res = await c.request('POST', '/signup', { form: { ...form, currency: 'XXX', shopName: '' } });
		expect(res.status).toBe(400);
		const html = await res.text();
		expect(html).toContain('Choose one of EUR, USD');
		expect(html).toContain("Type the shop's name.");
		expect(await signupsOf(email)).toBe(0);
	});

	it('mails a link; nothing works before it; the link and the password make the owner of the new shop', async () => {
		const started = Date.now() - 1000;
		const c = new Client(baseURL);
		const res = await c.request('POST', '/signup', { form });
		expect(res.status).toBe(200);
		const page = await res.text();
		expect(page).toContain(`We sent a link to ${email}`);

		// Before the link: no account, no shop, and signing in with the chosen password fails.
		expect(await usersWith(email)).toBe(0);
		expect(await shopsNamed(shopName)).toBe(0);
		const early = new Client(baseURL);
		const tried = await early.signIn(email, password);
		expect(tried.status).toBe(400);
		expect(early.signedIn).toBe(false);

		const mail = await waitForMail(email, /Confirm your address to create your shop/, started);
		const link = firstLink(mail);
		expect(link).toMatch(new RegExp(`^${baseURL}/signup/confirm/[A-Za-z0-9_-]{30,}$`));
		const path = link.slice(baseURL.length);

		const confirmPage = await c.get(path);
		expect(confirmPage.status).toBe(200);
		expect(await confirmPage.text()).toContain(`Finish creating ${shopName}`);
		// Opening the link created nothing yet (mail scanners open links too).
		expect(await usersWith(email)).toBe(0);

		const wrong = await c.request('POST', `${path}?/confirm`, { form: { providerId: 'credentials', email, password: 'not the password', redirectTo: '/' } });
		expect(wrong.status).toBe(400);
		expect(await wrong.text()).toContain('That is not the password you chose');
		expect(await usersWith(email)).toBe(0);

		const done = await c.request('POST', `${path}?/confirm`, { form: { providerId: 'credentials', email, password, redirectTo: '/' } });
		expect([302, 303]).toContain(done.status);
		expect(c.signedIn).toBe(true);

		const me = await (await c.get('/api/v1/me', { accept: 'application/json' })).json();
		expect(me).toMatchObject({ user: { email, name: 'Robin Founder' }, shop: { name: shopName }, role: 'owner' });
		const settings = await c.get('/settings/shop');
		expect(settings.status).toBe(200);
		const html = await settings.text();
		expect(html).toContain('Inches (in)');
		expect(html).toContain('Miles (mi)');
		expect(html).toContain('US dollar (USD)');
		const [shop] = await sql.begin(async (t) => {
			await t`select set_config('lapmark.system', 'on', true)`;
			return t<{ length_unit: string; distance_unit: string; currency: string; slug: string }[]>`select length_unit, distance_unit, currency, slug from shops where name = ${shopName}`;
		});
		expect(shop).toEqual({ length_unit: 'in', distance_unit: 'mi', currency: 'USD', slug: `harbour-head-works-${tag}` });

		// The link works once.
		const again = await new Client(baseURL).get(path);
		expect(await again.text()).toContain('This sign-up link was already used');
		const reuse = await new Client(baseURL).request('POST', `${path}?/confirm`, { form: { providerId: 'credentials', email, password, redirectTo: '/' } });
		expect(reuse.status).toBe(410);
		expect(await shopsNamed(shopName)).toBe(1);
	});

	it('answers a sign-up for a known address the same way, and mails that person a note instead', async () => {
		const started = Date.now() - 1000;
		const otherShop = `Second Shop ${tag}`;
		const res = await new Client(baseURL).request('POST', '/signup', { form: { ...form, shopName: otherShop, password: 'some other password' } });
		expect(res.status).toBe(200);
		expect(await res.text()).toContain(`We sent a link to ${email}`);
		const note = await waitForMail(email, /Someone tried to create a Lapmark shop with your address/, started);
		expect(note.text).toContain('already has a Lapmark account, so nothing was created');
		expect(note.text).not.toMatch(/signup\/confirm/);
		expect(await shopsNamed(otherShop)).toBe(0);
		expect(await count((t) => t`select count(*)::int as n from shop_signups where shop_name = ${otherShop}`)).toBe(0);
	});

	it('tells a link that is not valid', async () => {
		const res = await new Client(baseURL).get('/signup/confirm/not-a-real-link');
		expect(res.status).toBe(200);
		expect(await res.text()).toContain('This sign-up link is not valid');
	});
});
