// npm run bench:stats — the statistics routes at a million readings, against the bare SQL of the
// same aggregate.
//
// Run through scripts/bench.sh, which hands over a fresh scratch database (BENCH_DATABASE_URL)
// and a build of the app. Steps:
//   1. migrate; seed the demo generator scaled to BENCH_READINGS readings (default 1,000,000)
//      through seedDemo (COPY into staging, one INSERT … SELECT per shop: the triggers run);
//   2. check the summaries against a full recomputation;
//   3. start `node build` on BENCH_PORT (default 3310) and time each route over HTTP with the
//      demo owner's API token, median of BENCH_RUNS (default 20) after 3 warm-up requests;
//   4. time the bare SQL of the same aggregate through psql, as the app's role with the shop
//      set (row-level security on, as in the app), median of the same number of runs;
//   5. time what the readings triggers cost: all readings deleted and inserted again, with the
//      triggers and without, inside a transaction that is rolled back (BENCH_TRIGGER=0 skips).
// Prints a table, then one line of JSON.
import { spawn, spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import postgres from 'postgres';
import { seriesKey } from '../src/lib/server/db/series';
import { demoSignIns } from '../src/lib/server/demo/generate';
import { createDb } from '../src/lib/server/db/client';
import { withShop } from '../src/lib/server/db/scope';
import { checkReading, compare, distribution, rates } from '../src/lib/server/services/stats';
import { seedReadings } from './seed';

const url = process.env.BENCH_DATABASE_URL;
const psqlBin = process.env.BENCH_PSQL ?? 'psql';
if (!url) {
	console.error('BENCH_DATABASE_URL is not set: run `npm run bench:stats`.');
	process.exit(2);
}
const target = Number(process.env.BENCH_READINGS ?? 1_000_000);
const runs = Number(process.env.BENCH_RUNS ?? 20);
const port = Number(process.env.BENCH_PORT ?? 3310);
const endDate = '2026-06-30';
const log = (m: string) => console.error(`[bench] ${m}`);
const median = (xs: number[]) => {
	const s = [...xs].sort((a, b) => a - b);
	const m = s.length >> 1;
	return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};
const r1 = (x: number) => Math.round(x * 10) / 10;

// ---------------------------------------------------------------------------------------------
// 1. Data

const { sql, seeded, seedMs, readingsInsertMs } = await seedReadings(url, target, endDate, log);

const system = <T>(work: (t: postgres.TransactionSql) => Promise<T>) =>
	sql.begin(async (t) => {
		await t`select set_config('lapmark.system', 'on', true)`;
		return work(t);
	}) as Promise<T>;

// ---------------------------------------------------------------------------------------------
// 2. Summaries against a full recomputation

const [consistency] = await system(
	(t) => t<{ moments: number; counts: number; groups: number }[]>`
		with e as (
			select shop_id, series_key, family_id, lapmark_month(measured_at) as month, count(*)::int as n,
				avg(value) as mean, var_pop(value) * count(*) as m2, min(value) as mn, max(value) as mx
			from readings group by 1, 2, 3, 4
		), c as (
			select shop_id, series_key, family_id, lapmark_month(measured_at) as month, value, count(*)::int as n
			from readings group by 1, 2, 3, 4, 5
		)
		select
			(select count(*)::int from e full join reading_summaries s using (shop_id, series_key, family_id, month)
				where e.n is distinct from s.n or e.mn is distinct from s.min or e.mx is distinct from s.max
					or abs(e.mean - s.mean) > 1e-12 * abs(e.mean) or abs(e.m2 - s.m2) > 1e-9 * greatest(e.m2, 1e-12)) as moments,
			(select count(*)::int from c full join reading_value_counts v using (shop_id, series_key, family_id, month, value)
				where c.n is distinct from v.n) as counts,
			(select count(*)::int from reading_summaries) as groups`
);
log(`summaries: ${consistency.groups} group-months; ${consistency.moments} moment rows and ${consistency.counts} count rows differ from a full recomputation`);

// ---------------------------------------------------------------------------------------------
// 3 and 4. Routes over HTTP, bare SQL through psql

const owner = demoSignIns().find((s) => s.shop === 'brackenford' && s.role === 'owner')!;
const [ids] = await system(
	(t) => t<{ shop: string; family: string }[]>`
		select s.id as shop, f.id as family from shops s join families f on f.shop_id = s.id
		where s.slug = 'brackenford' and f.code = 'ALDER-4'`
);
const keyAR = (side: 'intake' | 'exhaust') => seriesKey('clearance', 'as_received', side);
const lit = (s: string) => `'${s}'`;
const enumSeries = (side: string) => `measurement = 'clearance' and stage = 'as_received' and side = '${side}'`;

/** The bare SQL of each route's aggregate, with the series given as `where` text. */
const bare = {
	distribution: (series: string) => `
		with r as (select value from readings where shop_id = ${lit(ids.shop)} and family_id = ${lit(ids.family)} and ${series}),
		s as (select count(*) as n, avg(value) as mean, stddev_samp(value) as sd, min(value) as mn, max(value) as mx,
			percentile_cont(array[0.05, 0.25, 0.5, 0.75, 0.95]) within group (order by value) as q from r),
		f as (select s.*, q[2] - 1.5 * (q[4] - q[2]) as lo, q[4] + 1.5 * (q[4] - q[2]) as hi,
			least(60, greatest(5, ceil((mx - mn) / nullif(2 * (q[4] - q[2]) / cbrt(n), 0))))::int as k from s),
		lim as (select min, max from limits where shop_id = ${lit(ids.shop)} and family_id = ${lit(ids.family)}
			and measurement = 'clearance' and stage = 'as_received' and side = 'exhaust' and effective_from <= current_date
			order by effective_from desc limit 1),
		hist as (select width_bucket(r.value, f.mn, f.mx * (1 + 1e-12), coalesce(f.k, 60)) as b, count(*) as n from r, f group by 1)
		select f.*,
			(select percentile_cont(0.5) within group (order by abs(r.value - f.q[3])) from r) as mad,
			(select count(*) from r where r.value < f.lo or r.value > f.hi) as tukey,
			(select count(*) from r, lim where r.value < coalesce(lim.min, '-Infinity') or r.value > coalesce(lim.max, 'Infinity')) as outside,
			(select json_agg(hist order by b) from hist) as histogram
		from f`,
	compare: (series: string) => `
		with r as (select family_id, value from readings where shop_id = ${lit(ids.shop)} and ${series}),
		s as (select family_id, count(*) as n, avg(value) as mean, stddev_samp(value) as sd, min(value) as mn, max(value) as mx,
			percentile_cont(array[0.05, 0.25, 0.5, 0.75, 0.95]) within group (order by value) as q from r group by 1),
		m as (select r.family_id, percentile_cont(0.5) within group (order by abs(r.value - s.q[3])) as mad,
			count(*) filter (where r.value < s.q[2] - 1.5 * (s.q[4] - s.q[2]) or r.value > s.q[4] + 1.5 * (s.q[4] - s.q[2])) as tukey
			from r join s using (family_id) group by 1),
		lim as (select distinct on (family_id) family_id, min, max from limits where shop_id = ${lit(ids.shop)}
			and measurement = 'clearance' and stage = 'as_received' and side = 'exhaust' and effective_from <= current_date
			order by family_id, effective_from desc),
		o as (select r.family_id, count(*) as outside from r join lim using (family_id)
			where r.value < coalesce(lim.min, '-Infinity') or r.value > coalesce(lim.max, 'Infinity') group by 1)
		select s.*, m.mad, m.tukey, coalesce(o.outside, 0) as outside
		from s join m using (family_id) left join o using (family_id) order by s.q[3]`,
	rates: (series: string) => {
		// With series_key the query can stay on readings_series_idx's columns, as the route's does;
		// on enum columns it joins the limits on them and groups by side.
		const keyed = series.includes('series_key');
		return `
		with lv as (select l.*, lead(l.effective_from) over (partition by l.family_id, l.measurement, l.side, l.stage order by l.effective_from) as effective_to from limits l),
		pos as (
			select r.family_id, ${keyed ? 'r.series_key' : 'r.side'} as s, r.cylinder,
				bool_or(r.value < coalesce(lv.min, '-Infinity') or r.value > coalesce(lv.max, 'Infinity')) as failed
			from readings r
			join lv on lv.family_id = r.family_id and ${keyed ? 'lapmark_series(lv.measurement, lv.stage, lv.side) = r.series_key' : 'lv.measurement = r.measurement and lv.stage = r.stage and lv.side = r.side'}
				and lv.effective_from <= (r.measured_at at time zone 'UTC')::date
				and (lv.effective_to is null or lv.effective_to > (r.measured_at at time zone 'UTC')::date)
			where r.shop_id = ${lit(ids.shop)} and ${series}
			group by r.head_id, r.family_id, 2, r.cylinder, r.valve
		)
		select family_id, s, cylinder, count(*) as n, count(*) filter (where failed) as failures from pos group by 1, 2, 3`;
	},
	check: (series: string) => `
		with r as (select value from readings where shop_id = ${lit(ids.shop)} and family_id = ${lit(ids.family)} and ${series}),
		s as (select count(*) as n, count(*) filter (where value < 0.13) as below, count(*) filter (where value = 0.13) as equal,
			percentile_cont(array[0.25, 0.5, 0.75]) within group (order by value) as q from r)
		select s.*, (select percentile_cont(0.5) within group (order by abs(r.value - s.q[2])) from r) as mad,
			(select max from limits where shop_id = ${lit(ids.shop)} and family_id = ${lit(ids.family)} and measurement = 'clearance'
				and stage = 'as_received' and side = 'exhaust' and effective_from <= current_date order by effective_from desc limit 1) as max
		from s`
};

const byKey = {
	distribution: `series_key = ${keyAR('exhaust')}`,
	compare: `series_key = ${keyAR('exhaust')}`,
	rates: `r.series_key in (${keyAR('intake')}, ${keyAR('exhaust')})`,
	check: `series_key = ${keyAR('exhaust')}`
};
const byEnum = {
	distribution: enumSeries('exhaust'),
	compare: enumSeries('exhaust'),
	rates: `r.measurement = 'clearance' and r.stage = 'as_received'`,
	check: enumSeries('exhaust')
};

const routes = {
	distribution: '/api/v1/stats/distribution?measurement=clearance&family=ALDER-4&side=exhaust&stage=as_received',
	compare: '/api/v1/stats/compare?measurement=clearance&side=exhaust&stage=as_received',
	rates: '/api/v1/stats/rates?check=clearance',
	check: '/api/v1/check?family=ALDER-4&side=exhaust&measurement=clearance&value=0.13'
} as const;
type Route = keyof typeof routes;

const dir = mkdtempSync(join(tmpdir(), 'lapmark-bench-'));
/** Median time of a statement through psql (client-side \timing, output discarded). */
function psqlMedian(query: string): number {
	const file = join(dir, 'q.sql');
	const body = [`\\set ON_ERROR_STOP on`, `set lapmark.shop_id = '${ids.shop}';`, '\\o /dev/null', ...Array(3).fill(`${query};`), '\\timing on', ...Array(runs).fill(`${query};`)];
	writeFileSync(file, body.join('\n') + '\n');
	const out = spawnSync(psqlBin, ['-X', '-q', '-d', url!, '-f', file], { encoding: 'utf8' });
	if (out.status !== 0) throw new Error(`psql failed: ${out.stderr}`);
	const times = [...out.stdout.matchAll(/Time: ([\d.]+) ms/g)].map((m) => Number(m[1]));
	if (times.length !== runs) throw new Error(`psql printed ${times.length} timings, expected ${runs}`);
	return median(times);
}

const server = spawn('node', ['build'], {
	env: {
		...process.env,
		DATABASE_URL: url,
		PORT: String(port),
		HOST: '127.0.0.1',
		ORIGIN: `http://127.0.0.1:${port}`,
		AUTH_SECRET: randomBytes(32).toString('hex'),
		BODY_SIZE_LIMIT: 'Infinity'
	},
	stdio: ['ignore', 'ignore', 'inherit']
});
const base = `http://127.0.0.1:${port}`;
try {
	const deadline = Date.now() + 30_000;
	for (;;) {
		const ok = await fetch(`${base}/api/health`).then((r) => r.ok, () => false);
		if (ok) break;
		if (Date.now() > deadline) throw new Error(`the app did not start on ${base}`);
		await new Promise((r) => setTimeout(r, 200));
	}

	const httpMedian = async (path: string) => {
		const once = async () => {
			const t0 = performance.now();
			const res = await fetch(base + path, { headers: { authorization: `Bearer ${owner.token}`, accept: 'application/json' } });
			const body = await res.text();
			const ms = performance.now() - t0;
			if (res.status !== 200) throw new Error(`${path}: ${res.status} ${body.slice(0, 200)}`);
			return ms;
		};
		// Warm-up; the first may meet a keep-alive socket the server has just closed while psql ran.
		for (let i = 0; i < 3; i++) await once().catch(() => once());
		const times: number[] = [];
		for (let i = 0; i < runs; i++) times.push(await once());
		return median(times);
	};

	// The floor every API request pays: token lookup, a transaction, JSON.
	const floorMs = r1(await httpMedian('/api/v1/me'));
	// The same work in this process, straight on a database connection: the engine without HTTP.
	const app = createDb(url!, { max: 1 });
	const services: Record<Route, () => Promise<unknown>> = {
		distribution: () => withShop(app.db, ids.shop, (t) => distribution(t, ids.shop, { measurement: 'clearance', family: 'ALDER-4', side: 'exhaust', stage: 'as_received' })),
		compare: () => withShop(app.db, ids.shop, (t) => compare(t, ids.shop, { measurement: 'clearance', side: 'exhaust', stage: 'as_received' })),
		rates: () => withShop(app.db, ids.shop, (t) => rates(t, ids.shop, { check: { kind: 'measurement', measurement: 'clearance' } })),
		check: () => withShop(app.db, ids.shop, (t) => checkReading(t, ids.shop, { family: 'ALDER-4', side: 'exhaust', stage: 'as_received', measurement: 'clearance', value: 0.13 }))
	};
	const inProcess = async (f: () => Promise<unknown>) => {
		for (let i = 0; i < 3; i++) await f();
		const times: number[] = [];
		for (let i = 0; i < runs; i++) {
			const t0 = performance.now();
			await f();
			times.push(performance.now() - t0);
		}
		return median(times);
	};

	const results = {} as Record<Route, { ms: number; sqlMs: number; ratio: number; sqlEnumMs: number; serviceMs: number }>;
	for (const name of Object.keys(routes) as Route[]) {
		const ms = await httpMedian(routes[name]);
		const sqlMs = psqlMedian(bare[name](byKey[name]));
		const sqlEnumMs = psqlMedian(bare[name](byEnum[name]));
		const serviceMs = await inProcess(services[name]);
		results[name] = { ms: r1(ms), sqlMs: r1(sqlMs), ratio: Math.round((ms / sqlMs) * 100) / 100, sqlEnumMs: r1(sqlEnumMs), serviceMs: r1(serviceMs) };
	}
	await app.sql.end();

	console.log(`\nStatistics routes at ${seeded.counts.readings.toLocaleString('en-US')} readings (median of ${runs}; HTTP with an API token vs psql, both with row-level security)`);
	console.log('route          HTTP ms   bare SQL ms   ratio   in-process ms   bare SQL filtering enum columns ms');
	for (const [name, r] of Object.entries(results)) {
		console.log(
			`${name.padEnd(14)} ${String(r.ms).padStart(7)}   ${String(r.sqlMs).padStart(11)}   ${r.ratio.toFixed(2).padStart(5)}   ${String(r.serviceMs).padStart(13)}   ${String(r.sqlEnumMs).padStart(10)}`
		);
	}
	console.log('bare SQL filters on series_key, the index a person would use; "enum columns" filters measurement/stage/side,');
	console.log('which row-level security keeps out of any index scan. In-process: the service on a direct connection, no HTTP.');
	console.log(`(GET /api/v1/me, token and transaction only: ${floorMs} ms)`);
	console.log(`targets: distribution, compare, rates under 300 ms and within 1.5× of bare SQL; check under 20 ms`);

	// ------------------------------------------------------------------------------------------
	// 5. What the triggers cost

	let trigger: Record<string, number> | null = null;
	if (process.env.BENCH_TRIGGER !== '0') {
		server.kill('SIGTERM');
		log('timing the readings triggers: all readings deleted and inserted again, with and without them (rolled back)');
		const cols = 'shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, instrument_id, batch_id';
		const timed = async (t: postgres.TransactionSql, q: string) => {
			const t0 = performance.now();
			await t.unsafe(q);
			return performance.now() - t0;
		};
		trigger = {};
		await sql
			.begin(async (t) => {
				await t`select set_config('lapmark.system', 'on', true)`;
				await t.unsafe(`create temp table bench_copy as select ${cols} from readings`);
				trigger!.deleteWithMs = Math.round(await timed(t, 'delete from readings'));
				trigger!.insertWithMs = Math.round(await timed(t, `insert into readings (${cols}) select ${cols} from bench_copy`));
				await t.unsafe('alter table readings disable trigger user');
				trigger!.deleteWithoutMs = Math.round(await timed(t, 'delete from readings'));
				trigger!.insertWithoutMs = Math.round(await timed(t, `insert into readings (${cols}) select ${cols} from bench_copy`));
				throw new Error('rollback');
			})
			.catch((e) => {
				if (e.message !== 'rollback') throw e;
			});
		console.log(
			`readings triggers, ${seeded.counts.readings.toLocaleString('en-US')} rows in one statement: insert ${trigger.insertWithMs} ms with, ${trigger.insertWithoutMs} ms without; delete ${trigger.deleteWithMs} ms with, ${trigger.deleteWithoutMs} ms without`
		);
	}

	const line = {
		readings: seeded.counts.readings,
		routes: Object.fromEntries(Object.entries(results).map(([k, v]) => [k, { ms: v.ms, sqlMs: v.sqlMs, ratio: v.ratio }])),
		apiFloorMs: floorMs,
		sqlOnEnumColumnsMs: Object.fromEntries(Object.entries(results).map(([k, v]) => [k, v.sqlEnumMs])),
		inProcessMs: Object.fromEntries(Object.entries(results).map(([k, v]) => [k, v.serviceMs])),
		loadAverage: loadavg()[0],
		seed: { ms: Math.round(seedMs), readingsInsertMs: readingsInsertMs },
		summariesMismatched: consistency.moments + consistency.counts,
		trigger
	};
	console.log(JSON.stringify(line));
} finally {
	if (server.exitCode === null && server.signalCode === null) server.kill('SIGTERM');
	rmSync(dir, { recursive: true, force: true });
	await sql.end();
}
