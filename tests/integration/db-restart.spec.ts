// Item 10: the web server survives PostgreSQL restarts. A cluster and an app server of this test's
// own; a bounded request loop on loopback while the cluster is restarted five times.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoSignIns } from '../../src/lib/server/demo/generate';
import { Client } from '../helpers/http';
import { demoCluster, removeCluster, startApp, waitFor, type AppServer, type Cluster } from '../helpers/cluster';

const MESSAGE = 'The database is not answering; retrying.';
let cluster: Cluster | undefined;
let app: AppServer | undefined;

beforeAll(async () => {
	cluster = await demoCluster('restart');
	app = await startApp(cluster.appUrl());
}, 180_000);

afterAll(async () => {
	await app?.stop();
	await removeCluster(cluster);
}, 60_000);

interface Sample {
	at: number;
	ok: boolean;
	what: string;
}

describe('PostgreSQL restarts under load', () => {
	it('keeps the same server process answering, failing requests only around each restart', async () => {
		const { baseURL, child } = app!;
		const owner = demoSignIns().find((s) => s.role === 'owner')!;
		const paths = ['/api/v1/me', '/api/v1/families', '/api/v1/overview', '/api/health'];
		const samples: Sample[] = [];
		let running = true;
		// Four workers, each one request at a time with a 40 ms pause: about 20–40 requests/s.
		const worker = async (w: number) => {
			for (let i = w; running; i++) {
				const at = Date.now();
				try {
					const res = await fetch(baseURL + paths[i % paths.length], {
						headers: { authorization: `Bearer ${owner.token}` },
						signal: AbortSignal.timeout(10_000)
					});
					await res.text();
					samples.push({ at, ok: res.status === 200, what: String(res.status) });
				} catch (e) {
					samples.push({ at, ok: false, what: String((e as { cause?: { code?: string } }).cause?.code ?? e) });
				}
				await new Promise((r) => setTimeout(r, 40));
			}
		};
		const loop = Promise.all([0, 1, 2, 3].map(worker));

		const windows: [number, number][] = [];
		await new Promise((r) => setTimeout(r, 1500));
		for (let n = 0; n < 5; n++) {
			const from = Date.now();
			const res = await cluster!.pg('restart');
			expect(res.code, res.stderr).toBe(0);
			windows.push([from, Date.now()]);
			await new Promise((r) => setTimeout(r, 2500));
		}
		await new Promise((r) => setTimeout(r, 2000));
		running = false;
		await loop;

		// The same process, never restarted: still running and answering.
		expect(child.exitCode).toBe(null);
		expect(child.signalCode).toBe(null);
		const me = await fetch(`${baseURL}/api/v1/me`, { headers: { authorization: `Bearer ${owner.token}` } });
		expect(me.status).toBe(200);
		expect(app!.output()).not.toContain('TypeError');

		// Failures only from just before a restart began until 5 s after it ended.
		const outside = samples.filter((s) => !s.ok && !windows.some(([a, b]) => s.at >= a - 500 && s.at <= b + 5000));
		expect(outside).toEqual([]);
		expect(samples.filter((s) => s.ok).length).toBeGreaterThan(100);
	}, 120_000);

	it('answers 503 with the message while the database is down, pages and API alike', async () => {
		const { baseURL } = app!;
		const owner = demoSignIns().find((s) => s.role === 'owner')!;
		const browser = new Client(baseURL);
		await browser.signIn(owner.email, owner.password);
		expect(browser.signedIn).toBe(true);
		expect((await browser.get('/')).status).toBe(200);

		expect((await cluster!.pg('stop')).code).toBe(0);
		try {
			const page = await browser.get('/', { accept: 'text/html' });
			expect(page.status).toBe(503);
			const html = await page.text();
			expect(html).toContain(MESSAGE);

			const api = await fetch(`${baseURL}/api/v1/families`, { headers: { authorization: `Bearer ${owner.token}` } });
			expect(api.status).toBe(503);
			expect(await api.json()).toMatchObject({ message: MESSAGE });

			const health = await fetch(`${baseURL}/api/health`);
			expect(health.status).toBe(503);
			expect(await health.json()).toEqual({ ok: false, db: 'down', message: MESSAGE });
		} finally {
			expect((await cluster!.pg('start')).code).toBe(0);
		}
		await waitFor(async () => (await fetch(`${baseURL}/api/health`)).ok, 20_000, 'the database, seen from the app');
		expect((await browser.get('/')).status).toBe(200);
	}, 60_000);
});
