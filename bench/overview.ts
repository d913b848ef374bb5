// npm run bench:overview — the shop overview's first load in a real browser, on the full demo.
//
// Run through scripts/bench.sh, which hands over a fresh scratch database (BENCH_DATABASE_URL)
// and a build of the app. Steps:
//   1. migrate and seed the same demo `npm start` seeds (VACUUM ANALYZE included), unless the
//      database already holds it (KEEP_BENCH_DB=1 on an earlier run);
//   2. start `node server.js` on BENCH_PORT (default 3320) and sign in as the demo owner in Debian's
//      chromium (playwright-core);
//   3. BENCH_RUNS times (default 7), in a fresh browser context each (nothing cached), open `/`
//      and time until every figure, chart and list has settled; count the JavaScript the page
//      fetched (bytes on the wire, as the server sent them) and the API requests it made.
// Prints each run and the median, then one line of JSON.
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { loadavg } from 'node:os';
import postgres from 'postgres';
import { chromium } from 'playwright-core';
import { runMigrations } from '../scripts/migrate';
import { seedDemo } from '../src/lib/server/demo/seed';

const url = process.env.BENCH_DATABASE_URL;
if (!url) {
	console.error('BENCH_DATABASE_URL is not set: run `npm run bench:overview`.');
	process.exit(2);
}
const runs = Number(process.env.BENCH_RUNS ?? 7);
const port = Number(process.env.BENCH_PORT ?? 3320);
const base = `http://127.0.0.1:${port}`;
const log = (m: string) => console.error(`[bench] ${m}`);
const median = (xs: number[]) => {
	const s = [...xs].sort((a, b) => a - b);
	const m = s.length >> 1;
	return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

await runMigrations(url);
const sql = postgres(url, { max: 1, onnotice: () => {} });
const t0 = performance.now();
// A database kept from an earlier run (KEEP_BENCH_DB=1) is used as it is.
// Row-level security hides every shop's rows outside a scope, so look under the system one.
const [{ shopsThere, readingsThere }] = await sql.begin(async (t) => {
	await t`select set_config('lapmark.system', 'on', true)`;
	return t<{ shopsThere: number; readingsThere: number }[]>`select (select count(*) from shops)::int as "shopsThere", (select coalesce(sum(n), 0) from reading_summaries)::int as "readingsThere"`;
});
let readingsTotal: number;
if (shopsThere > 0) {
	readingsTotal = readingsThere;
	log(`reusing the demo already in the database (${readingsTotal} readings)`);
} else {
	const seeded = await seedDemo(sql, { endDate: new Date().toISOString().slice(0, 10), analyze: true });
	readingsTotal = seeded.counts.readings;
	log(`demo seeded: ${seeded.counts.heads} heads, ${seeded.counts.readings} readings in ${((performance.now() - t0) / 1000).toFixed(1)} s`);
}
await sql.end();

const server = spawn('node', ['server.js'], {
	env: { ...process.env, DATABASE_URL: url, PORT: String(port), HOST: '127.0.0.1', ORIGIN: base, AUTH_SECRET: process.env.AUTH_SECRET ?? randomBytes(24).toString('hex') },
	stdio: ['ignore', 'ignore', 'inherit']
});
for (let i = 0; ; i++) {
	if (await fetch(`${base}/api/health`).then((r) => r.ok).catch(() => false)) break;
	if (i > 150) throw new Error('the app did not start');
	await new Promise((r) => setTimeout(r, 200));
}

const browser = await chromium.launch({
	executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
	args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync']
});
type Run = { ms: number; jsBytes: number; jsFiles: number; apiRequests: number; slowestApiMs: number };
const results: Run[] = [];
try {
	// Sign in once; each run gets the session cookie in a new context with an empty cache.
	const signIn = await browser.newContext();
	const p = await signIn.newPage();
	await p.goto(`${base}/signin`);
	await p.getByLabel('E-mail address').fill('owner@brackenford.example');
	await p.getByLabel('Password').fill('brackenford-owner-demo');
	await p.getByRole('button', { name: 'Sign in' }).click();
	await p.waitForURL((u) => !u.pathname.startsWith('/signin'));
	const cookies = await signIn.cookies();
	await signIn.close();

	for (let i = 0; i < runs + 1; i++) {
		const context = await browser.newContext({ viewport: { width: 1440, height: 1000 } });
		await context.addCookies(cookies);
		const page = await context.newPage();
		const start = performance.now();
		await page.goto(`${base}/`);
		await page.waitForFunction(
			() => document.querySelector('[data-testid="overview-figures"]') && document.querySelectorAll('[data-state="loading"],[aria-busy="true"]').length === 0 && document.querySelectorAll('.chart-area[data-state="ready"] svg').length >= 2,
			null,
			{ timeout: 60_000 }
		);
		const ms = performance.now() - start;
		// Sizes and API timings from the page's own Resource Timing entries, read once it has settled:
		// asking the browser over CDP for each response while the page loads would slow the load down.
		const seen = await page.evaluate(() =>
			(performance.getEntriesByType('resource') as PerformanceResourceTiming[]).map((r) => ({ path: new URL(r.name).pathname, bytes: r.transferSize, ms: r.responseEnd - r.requestStart }))
		);
		const js = seen.filter((r) => r.path.endsWith('.js'));
		const api = seen.filter((r) => r.path.startsWith('/api/'));
		const sizes = js.map((r) => r.bytes);
		const apiRequests = api.length;
		const slowestApiMs = Math.round(Math.max(0, ...api.map((r) => r.ms)));
		const run = { ms: Math.round(ms), jsBytes: sizes.reduce((a, b) => a + b, 0), jsFiles: sizes.length, apiRequests, slowestApiMs };
		// The first run warms the server (connections, query plans); it is printed, not counted.
		log(`${i === 0 ? 'warm-up' : `run ${i}`}: all charts in ${run.ms} ms, ${run.jsFiles} JS files, ${(run.jsBytes / 1024).toFixed(0)} KiB of JS, ${apiRequests} API requests (slowest ${slowestApiMs} ms)`);
		if (i > 0) results.push(run);
		await context.close();
	}
} finally {
	await browser.close();
	server.kill('SIGTERM');
}
const out = {
	readings: readingsTotal,
	runs,
	medianMs: median(results.map((r) => r.ms)),
	maxMs: Math.max(...results.map((r) => r.ms)),
	jsKiB: Math.round(median(results.map((r) => r.jsBytes)) / 1024),
	jsFiles: median(results.map((r) => r.jsFiles)),
	apiRequests: median(results.map((r) => r.apiRequests)),
	slowestApiMs: median(results.map((r) => r.slowestApiMs)),
	loadAverage: loadavg()[0]
};
console.log(`overview first load: median ${out.medianMs} ms (max ${out.maxMs} ms) over ${runs} runs, ${out.jsKiB} KiB of JS in ${out.jsFiles} files, ${out.apiRequests} API requests (slowest ${out.slowestApiMs} ms); load average ${out.loadAverage.toFixed(1)}`);
console.log(JSON.stringify(out));
process.exit(0);
