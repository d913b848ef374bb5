// The local mail reader (/dev/mail) over HTTP: an owner reads their own mail and what their shop
// sent its own people and customers, never another shop's mail nor another account's sign-in
// link or password reset (not in the list, and 404 by id); a production start has no reader.
import { spawn } from 'node:child_process';
import { once } from 'node:events';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { withShop } from '../../src/lib/server/db/scope';
import { heads, invitations } from '../../src/lib/server/db/schema';
import { listFakeMail } from '../../src/lib/server/mail/fake-inbox';
import { createTransport, deliver, queueMail } from '../../src/lib/server/mail/outbox';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { shopWithPeople, uniqueEmail } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
const run = randomUUID().slice(0, 8);
type Shop = Awaited<ReturnType<typeof shopWithPeople>>;
let a: Shop;
let b: Shop;
const customerA = uniqueEmail('customer-a');
const newcomerA = uniqueEmail('newcomer-a');
const newcomerB = uniqueEmail('newcomer-b');
/** Fake-inbox id of each message, by its name below. */
const ids: Record<string, string> = {};

const SEEN = ['own sign-in link', 'report to a customer', 'invitation of this shop'];
const HIDDEN = ['invitation of the other shop', 'reset of the other shop owner', 'reset of a fellow member', 'sign-in link of a fellow member'];

beforeAll(async () => {
	a = await shopWithPeople(db, 'mailread-a');
	b = await shopWithPeople(db, 'mailread-b');
	await withShop(db, a.shop.id, async (tx) => {
		await tx.insert(heads).values({ shopId: a.shop.id, familyId: a.family.id, serial: `MAIL-${run}`, customer: 'A customer', customerEmail: customerA, receivedOn: '2026-11-02' });
		await tx.insert(invitations).values({ shopId: a.shop.id, email: newcomerA, role: 'machinist', tokenHash: `test-${run}`, expiresAt: new Date(Date.now() + 86_400_000) });
	});
	const mails: Record<string, { to: string; kind: string; shopId?: string }> = {
		'own sign-in link': { to: a.people.owner.email, kind: 'sign_in_link' },
		'report to a customer': { to: customerA, kind: 'head_report', shopId: a.shop.id },
		'invitation of this shop': { to: newcomerA, kind: 'invitation', shopId: a.shop.id },
		'invitation of the other shop': { to: newcomerB, kind: 'invitation', shopId: b.shop.id },
		'reset of the other shop owner': { to: b.people.owner.email, kind: 'password_reset' },
		'reset of a fellow member': { to: a.people.engineer.email, kind: 'password_reset' },
		'sign-in link of a fellow member': { to: a.people.machinist.email, kind: 'sign_in_link' }
	};
	// Through the outbox to the fake mail server, as the app sends them.
	const transport = createTransport(process.env.SMTP_URL!);
	for (const [name, m] of Object.entries(mails)) {
		const id = await queueMail(db, { ...m, subject: `${run} ${name}`, text: `http://127.0.0.1/secret-link-${name.replace(/\W+/g, '-')}` });
		expect((await deliver(db, transport, 'Lapmark test <test@lapmark.example>', id)).sent).toBe(true);
	}
	transport.close();
	for (const m of await listFakeMail(process.env.LAPMARK_MAIL_DIR!)) if (m.subject.startsWith(`${run} `)) ids[m.subject.slice(run.length + 1)] = m.id;
	expect(Object.keys(ids).sort()).toEqual(Object.keys(mails).sort());
});
afterAll(() => sql.end());

async function signedIn(base: string, email: string, password: string) {
	const c = new Client(base);
	const res = await c.signIn(email, password);
	expect([302, 303]).toContain(res.status);
	expect(c.signedIn).toBe(true);
	return c;
}

describe('/dev/mail in demo mode', () => {
	it('lists the owner’s own mail and their shop’s mail to its people, nothing else', async () => {
		const owner = await signedIn(baseURL, a.people.owner.email, a.people.owner.password);
		const res = await owner.get('/dev/mail');
		expect(res.status).toBe(200);
		const html = await res.text();
		for (const name of SEEN) expect(html, name).toContain(`${run} ${name}`);
		for (const name of HIDDEN) expect(html, name).not.toContain(`${run} ${name}`);
	});

	it('opens a readable message by id, and answers 404 for one that is not the owner’s to read', async () => {
		const owner = await signedIn(baseURL, a.people.owner.email, a.people.owner.password);
		for (const name of SEEN) {
			const res = await owner.get(`/dev/mail/${ids[name]}`);
			expect(res.status, name).toBe(200);
			expect(await res.text()).toContain(`secret-link-${name.replace(/\W+/g, '-')}`);
		}
		for (const name of HIDDEN) {
			const res = await owner.get(`/dev/mail/${ids[name]}`);
			expect(res.status, name).toBe(404);
			expect(await res.text()).not.toContain('secret-link');
		}
	});

	it('shows the other shop’s owner their own reset, none of shop A’s mail', async () => {
		const other = await signedIn(baseURL, b.people.owner.email, b.people.owner.password);
		const html = await (await other.get('/dev/mail')).text();
		expect(html).toContain(`${run} reset of the other shop owner`);
		// newcomerB has no open invitation in shop B's records: not one of shop B's people.
		expect(html).not.toContain(`${run} invitation of the other shop`);
		for (const name of SEEN) expect(html, name).not.toContain(`${run} ${name}`);
		expect((await other.get(`/dev/mail/${ids['own sign-in link']}`)).status).toBe(404);
	});
});

describe('/dev/mail in a production start', () => {
	it('does not exist when SMTP_URL is set and LAPMARK_DEMO is not 1 (404 for the list and by id)', async () => {
		const port = Number(process.env.LAPMARK_TEST_PORT ?? 3100) + 60;
		const base = `http://127.0.0.1:${port}`;
		// The fake's folder stays in the environment: even so, no reader without demo mode.
		const child = spawn('node', ['server.js'], {
			env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: base, LAPMARK_DEMO: '0', SMTP_URL: process.env.SMTP_URL },
			stdio: 'ignore'
		});
		const exited = once(child, 'exit');
		try {
			for (let i = 0; i < 150; i++) {
				if (await fetch(`${base}/api/health`).then((r) => r.ok).catch(() => false)) break;
				await new Promise((r) => setTimeout(r, 200));
			}
			const owner = await signedIn(base, a.people.owner.email, a.people.owner.password);
			expect((await owner.get('/dev/mail')).status).toBe(404);
			const one = await owner.get(`/dev/mail/${ids['own sign-in link']}`);
			expect(one.status).toBe(404);
			expect(await one.text()).not.toContain('secret-link');
		} finally {
			child.kill('SIGTERM');
			await exited;
		}
	});
});
