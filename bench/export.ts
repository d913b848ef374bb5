// npm run bench:export — GET /api/v1/readings streaming a million readings as CSV and as JSON.
//
// Run through scripts/bench.sh, which hands over a fresh scratch database (BENCH_DATABASE_URL)
// and a build of the app. Steps:
//   1. seed the demo generator scaled to BENCH_READINGS readings (default 1,000,000) in one shop,
//      as bench:stats does (bench/seed.ts);
//   2. for each format, start `node server.js` afresh (so its peak RSS belongs to that export alone),
//      download the whole export with the demo engineer's API token, counting rows and bytes as
//      they arrive, and read the server's peak RSS (VmHWM in /proc/<pid>/status);
//   3. check the row count against SQL, and that the JSON array is closed.
// Prints the figures, then one line of JSON.
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { demoSignIns } from '../src/lib/server/demo/generate';
import postgres from 'postgres';
import { runMigrations } from '../scripts/migrate';
import { seedScaled } from './seed';

const url = process.env.BENCH_DATABASE_URL;
if (!url) {
	console.error('BENCH_DATABASE_URL is not set: run `npm run bench:export`.');
	process.exit(2);
}
const target = Number(process.env.BENCH_READINGS ?? 1_000_000);
const port = Number(process.env.BENCH_PORT ?? 3311);
const log = (m: string) => console.error(`[bench] ${m}`);
const mb = (bytes: number) => Math.round(bytes / 1024 / 1024);
// e.g. --max-old-space-size=64: an export that held its rows would fail under such a heap.
const serverNodeOptions = process.env.BENCH_SERVER_NODE_OPTIONS ?? '';

await runMigrations(url);
const sql = postgres(url, { max: 2, onnotice: () => {} });
const { seeded } = await seedScaled(sql, target, '2026-06-30', log, 1);
await sql.unsafe('vacuum analyze readings, heads, families, instruments');
const engineer = demoSignIns({ shops: 1 }).find((s) => s.shop === 'brackenford' && s.role === 'engineer')!;
const [{ n: inShop }] = await sql.begin(async (t) => {
	await t`select set_config('lapmark.system', 'on', true)`;
	return t<{ n: number }[]>`select count(*)::int as n from readings r join shops s on s.id = r.shop_id where s.slug = 'brackenford'`;
});
log(`${inShop.toLocaleString('en-US')} readings in the exported shop`);

function peakRssMb(pid: number): { peak: number; now: number } {
	const status = readFileSync(`/proc/${pid}/status`, 'utf8');
	const kb = (name: string) => Number(new RegExp(`${name}:\\s+(\\d+)`).exec(status)?.[1] ?? 0);
	return { peak: Math.round(kb('VmHWM') / 1024), now: Math.round(kb('VmRSS') / 1024) };
}

async function startServer() {
	const server = spawn('node', ['server.js'], {
		env: { ...process.env, NODE_OPTIONS: serverNodeOptions, DATABASE_URL: url, PORT: String(port), HOST: '127.0.0.1', ORIGIN: `http://127.0.0.1:${port}`, AUTH_SECRET: randomBytes(32).toString('hex') },
		stdio: ['ignore', 'ignore', 'inherit']
	});
	const deadline = Date.now() + 30_000;
	for (;;) {
		const ok = await fetch(`http://127.0.0.1:${port}/api/health`).then((r) => r.ok, () => false);
		if (ok) return server;
		if (Date.now() > deadline) throw new Error('the app did not start');
		await new Promise((r) => setTimeout(r, 200));
	}
}

type Figures = { rows: number; seconds: number; firstByteMs: number; rowsPerSecond: number; megabytes: number; peakRssMb: number; idleRssMb: number };

async function exportOnce(format: 'csv' | 'json'): Promise<Figures> {
	const server = await startServer();
	try {
		// A warm server, as in use: one small API request first (modules, pool, token lookup).
		await fetch(`http://127.0.0.1:${port}/api/v1/me`, { headers: { authorization: `Bearer ${engineer.token}` } }).then((r) => r.text());
		const idle = peakRssMb(server.pid!).now;
		const t0 = performance.now();
		const res = await fetch(`http://127.0.0.1:${port}/api/v1/readings?format=${format}`, { headers: { authorization: `Bearer ${engineer.token}` } });
		if (res.status !== 200) throw new Error(`export answered ${res.status}: ${(await res.text()).slice(0, 300)}`);
		const reader = res.body!.getReader();
		let firstByteMs = 0;
		let bytes = 0;
		let newlines = 0;
		let tail = '';
		const decoder = new TextDecoder();
		for (;;) {
			const { done, value } = await reader.read();
			if (done) break;
			if (!firstByteMs) firstByteMs = performance.now() - t0;
			bytes += value.byteLength;
			for (let i = 0; i < value.length; i++) if (value[i] === 10) newlines++;
			tail = (tail + decoder.decode(value, { stream: true })).slice(-200);
		}
		const seconds = (performance.now() - t0) / 1000;
		const { peak } = peakRssMb(server.pid!);
		// CSV: a header line, then a line per row. JSON: "[", a line per row, "]" on a line of its own.
		const rows = format === 'csv' ? newlines - 1 : newlines - 2;
		if (format === 'json' && !tail.trimEnd().endsWith(']')) throw new Error('the JSON export did not end with ]');
		return { rows, seconds: Math.round(seconds * 100) / 100, firstByteMs: Math.round(firstByteMs), rowsPerSecond: Math.round(rows / seconds), megabytes: mb(bytes), peakRssMb: peak, idleRssMb: idle };
	} finally {
		const exited = new Promise((r) => server.once('exit', r));
		server.kill('SIGTERM');
		await exited;
	}
}

try {
	const csv = await exportOnce('csv');
	log(`CSV: ${csv.rows.toLocaleString('en-US')} rows, ${csv.megabytes} MB in ${csv.seconds} s`);
	const json = await exportOnce('json');
	log(`JSON: ${json.rows.toLocaleString('en-US')} rows, ${json.megabytes} MB in ${json.seconds} s`);
	for (const [name, f] of [['CSV', csv], ['JSON', json]] as const) {
		if (f.rows !== inShop) throw new Error(`${name} export has ${f.rows} rows; SQL counts ${inShop}`);
	}
	console.log(`\nReadings export at ${seeded.counts.readings.toLocaleString('en-US')} readings (GET /api/v1/readings with an API token, whole table, time order)`);
	console.log('format   rows         seconds   rows/s     MB     first byte ms   server peak RSS MB (idle)');
	for (const [name, f] of [['csv', csv], ['json', json]] as const) {
		console.log(
			`${name.padEnd(8)} ${f.rows.toLocaleString('en-US').padEnd(12)} ${String(f.seconds).padStart(7)}   ${f.rowsPerSecond.toLocaleString('en-US').padStart(8)}   ${String(f.megabytes).padStart(4)}   ${String(f.firstByteMs).padStart(13)}   ${f.peakRssMb} (${f.idleRssMb})`
		);
	}
	console.log(`The server reads the cursor 2,000 rows at a time${serverNodeOptions ? ` (server run with ${serverNodeOptions})` : ''}.`);
	console.log(JSON.stringify({ readings: seeded.counts.readings, exported: inShop, csv, json, serverNodeOptions, loadAverage: loadavg()[0] }));
} finally {
	await sql.end();
}
