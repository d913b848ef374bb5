// Installs of a real shop, each with a server of its own beside the suite's:
//  - `LAPMARK_DEMO=0 npm start` (scripts/start.sh) on a fresh, empty database of the test
//    cluster: nothing seeded, the first page offers to create the first shop, and it works;
//  - public sign-up off (LAPMARK_PUBLIC_SIGNUP=0): the page says so without a form, the POST is
//    refused, and the operator's `npm run shop:create` link lets the new owner in.
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { once } from 'node:events';
import { randomUUID } from 'node:crypto';
import { createServer } from 'node:net';
import { fileURLToPath } from 'node:url';
import postgres from 'postgres';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { firstLink, waitForMail } from '../helpers/mail';

const root = fileURLToPath(new URL('../..', import.meta.url));
const freshDb = `${process.env.LAPMARK_TEST_DB ?? 'lapmark_test'}_fresh`;
const { sql } = testDb();
const children: ChildProcess[] = [];

/** A port nobody listens on now (other checkouts test on this machine at the same time). */
function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const s = createServer();
		s.once('error', reject);
		s.listen(0, '127.0.0.1', () => {
			const port = (s.address() as { port: number }).port;
			s.close(() => resolve(port));
		});
	});
}

async function waitUp(base: string, child: ChildProcess, ms: number) {
	const deadline = Date.now() + ms;
	for (;;) {
		if (child.exitCode !== null) throw new Error(`the server for ${base} exited with ${child.exitCode}`);
		try {
			if ((await fetch(`${base}/api/health`)).ok) return;
		} catch {
			/* not up yet */
		}
		if (Date.now() > deadline) throw new Error(`no server on ${base}`);
		await new Promise((r) => setTimeout(r, 250));
	}
}

/** The private cluster's own admin steps (scripts/pg.sh), as `npm test` uses them. */
function pgAdmin(fn: string) {
	const r = spawnSync('bash', ['-c', `. scripts/pg.sh && ${fn}`], { cwd: root, env: process.env, encoding: 'utf8' });
	if (r.status !== 0) throw new Error(`${fn}: ${r.stderr}`);
}

/** The environment of `npm test` less what would point a child at the test database. */
function childEnv(extra: Record<string, string>) {
	const env: Record<string, string | undefined> = { ...process.env, ...extra };
	delete env.LAPMARK_PG_STARTED; // else its exit would stop the test cluster
	return env as NodeJS.ProcessEnv;
}

async function stop(child: ChildProcess) {
	if (child.exitCode !== null || child.signalCode !== null) return;
	const exited = once(child, 'exit');
	try {
		process.kill(-child.pid!, 'SIGTERM');
	} catch {
		child.kill('SIGTERM');
	}
	const timer = setTimeout(() => {
		try {
			process.kill(-child.pid!, 'SIGKILL');
		} catch {
			/* gone */
		}
	}, 15_000);
	await exited;
	clearTimeout(timer);
}

afterAll(async () => {
	await Promise.all(children.map(stop));
	await sql.end();
	if (!process.env.TEST_DATABASE_URL) pgAdmin(`pg_drop_database ${freshDb} >/dev/null`);
});

const signupForm = (email: string, shopName: string) => ({ ownerName: 'First Owner', email, password: 'first shop password', shopName, lengthUnit: 'mm', distanceUnit: 'km', currency: 'GBP' });

describe.skipIf(Boolean(process.env.TEST_DATABASE_URL))('LAPMARK_DEMO=0 npm start on an empty database', () => {
	let base = '';
	let fresh: postgres.Sql;

	beforeAll(async () => {
		const freshPort = await freePort();
		base = `http://127.0.0.1:${freshPort}`;
		pgAdmin(`pg_drop_database ${freshDb} >/dev/null`);
		const child = spawn('bash', ['scripts/start.sh'], {
			cwd: root,
			// No DATABASE_URL: start.sh picks its own database of the private cluster, by LAPMARK_DB.
			env: childEnv({ DATABASE_URL: '', LAPMARK_DEMO: '0', LAPMARK_DB: freshDb, PORT: String(freshPort), ORIGIN: base }),
			stdio: ['ignore', 'inherit', 'inherit'],
			detached: true
		});
		children.push(child);
		await waitUp(base, child, 150_000);
		const url = new URL(process.env.DATABASE_URL!);
		url.pathname = `/${freshDb}`;
		fresh = postgres(url.toString(), { max: 1, onnotice: () => {} });
	});
	afterAll(() => fresh?.end());

	it('holds no demo, and its first page offers to create the first shop', async () => {
		const [n] = await fresh.begin(async (t) => {
			await t`select set_config('lapmark.system', 'on', true)`;
			return t<{ shops: number; users: number; heads: number }[]>`select (select count(*)::int from shops) as shops, (select count(*)::int from "user") as users, (select count(*)::int from heads) as heads`;
		});
		expect(n).toEqual({ shops: 0, users: 0, heads: 0 });
		const c = new Client(base);
		const home = await c.get('/', { accept: 'text/html' });
		expect(home.status).toBe(303);
		expect(home.headers.get('location')).toBe('/signin?redirectTo=%2F');
		const signin = await (await c.get('/signin?redirectTo=%2F')).text();
		expect(signin).toContain('No shop exists here yet');
		expect(signin).toContain('href="/signup"');
		expect(signin).toContain('Create the first shop');
		expect(await (await c.get('/signup')).text()).toContain('Create the first shop');
	});

	it('creates the first shop through the sign-up, and then offers it no more', async () => {
		const started = Date.now() - 1000;
		const email = `first-${randomUUID().slice(0, 8)}@test.example`;
		const c = new Client(base);
		const res = await c.request('POST', '/signup', { form: signupForm(email, 'The First Shop') });
		expect(res.status).toBe(200);
		const link = firstLink(await waitForMail(email, /Confirm your address/, started));
		expect(link.startsWith(`${base}/signup/confirm/`)).toBe(true);
		const path = link.slice(base.length);
		const done = await c.request('POST', `${path}?/confirm`, { form: { providerId: 'credentials', email, password: 'first shop password', redirectTo: '/' } });
		expect([302, 303]).toContain(done.status);
		const me = await (await c.get('/api/v1/me', { accept: 'application/json' })).json();
		expect(me).toMatchObject({ shop: { name: 'The First Shop' }, role: 'owner' });
		const signin = await (await new Client(base).get('/signin')).text();
		expect(signin).not.toContain('No shop exists here yet');
	});
});

describe('public sign-up turned off (LAPMARK_PUBLIC_SIGNUP=0)', () => {
	let base = '';

	beforeAll(async () => {
		const closedPort = await freePort();
		base = `http://127.0.0.1:${closedPort}`;
		const child = spawn('node', ['server.js'], {
			cwd: root,
			env: childEnv({ PORT: String(closedPort), HOST: '127.0.0.1', ORIGIN: base, BODY_SIZE_LIMIT: 'Infinity', LAPMARK_PUBLIC_SIGNUP: '0' }),
			stdio: ['ignore', 'inherit', 'inherit'],
			detached: true
		});
		children.push(child);
		await waitUp(base, child, 60_000);
	});

	it('says so on the page, shows no form, and refuses the POST', async () => {
		const c = new Client(base);
		const page = await c.get('/signup');
		expect(page.status).toBe(200);
		const html = await page.text();
		expect(html).toContain('Public sign-up is turned off on this server');
		expect(html).not.toContain('name="shopName"');
		expect(await (await c.get('/signin')).text()).not.toContain('href="/signup"');

		const email = `closed-${randomUUID().slice(0, 8)}@test.example`;
		const res = await c.request('POST', '/signup', { form: signupForm(email, 'Closed Door Shop') });
		expect(res.status).toBe(403);
		const [n] = await sql`select count(*)::int as n from shop_signups where email = ${email}`;
		expect(n.n).toBe(0);
	});

	it("lets in the owner of a shop made by npm run shop:create, through the command's link", async () => {
		const started = Date.now() - 1000;
		const owner = `made-${randomUUID().slice(0, 8)}@test.example`;
		const shopName = `Operator Made ${owner.slice(5, 13)}`;
		const r = spawnSync('npx', ['tsx', 'scripts/shop-create.ts', '--name', shopName, '--owner', owner, '--currency', 'CAD'], {
			cwd: root,
			env: { ...process.env, ORIGIN: base },
			encoding: 'utf8',
			timeout: 60_000
		});
		expect(r.status, r.stderr).toBe(0);
		const link = firstLink(await waitForMail(owner, /is ready/, started));
		expect(r.stdout).toContain(link);
		const path = link.slice(base.length);
		const c = new Client(base);
		expect(await (await c.get(path)).text()).toContain('Choose a new password');
		const set = await c.request('POST', path, { form: { password: 'operator chosen pw', confirm: 'operator chosen pw' } });
		expect(set.status).toBe(303);
		expect(set.headers.get('location')).toBe('/signin?reset=1');
		const signedIn = await c.signIn(owner, 'operator chosen pw');
		expect([302, 303]).toContain(signedIn.status);
		const me = await (await c.get('/api/v1/me', { accept: 'application/json' })).json();
		expect(me).toMatchObject({ user: { email: owner }, shop: { name: shopName }, role: 'owner' });
	});
});
