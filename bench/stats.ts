// npm run bench:stats — the statistics routes at a million readings, against the bare SQL of the
// same aggregate.
//
// Run through scripts/bench.sh, which hands over a fresh scratch database (BENCH_DATABASE_URL)
// and a build of the app. Steps:
//   1. migrate; seed the demo generator scaled to BENCH_READINGS readings (default 1,000,000)
//      through seedDemo (COPY into staging, one INSERT … SELECT per shop: the triggers run);
//      with BENCH_REUSE=1, keep the readings a KEEP_BENCH_DB=1 run left instead;
//   2. check the summaries against a full recomputation, and the hand-written summary SQL of
//      step 4 against the raw SQL;
//   3. start `node server.js` on BENCH_PORT (default 3310) and time each route over HTTP with the
//      demo owner's API token, median of BENCH_RUNS (default 20), in BENCH_BLOCKS (default 4)
//      blocks alternating with those of step 4; the server is first warmed with BENCH_WARMUP
//      (default 40) untimed requests to each route, as a server that has been up a while is (its
//      JIT has compiled the request path), and each block starts with 3 more;
//   4. through psql, as the app's role with the shop set (row-level security on, as in the
//      app), median of the same number of runs: the bare SQL of the same aggregate over the
//      readings (sqlMs; "ratio" = route / sqlMs, the issue's measure) and the same figures read
//      by hand from the summaries (summarySqlMs, summaryRatio; for rates, reading_position_tallies);
//      for scale, the raw aggregate over every reading once (median of 3; BENCH_WHOLE=0 skips);
//   5. time what the readings triggers cost: all readings deleted and inserted again, with the
//      triggers and without, inside a transaction that is rolled back (BENCH_TRIGGER=0 skips).
// Prints a table, then one line of JSON.
import { spawn, spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import postgres from 'postgres';
import { runMigrations } from '../scripts/migrate';
import { seriesKey, seriesKeys } from '../src/lib/server/db/series';
import { defaultRateStage } from '../src/lib/schemas/stats';
import { measurementTallies } from '../src/lib/server/queries/stats';
import { resolveFamily, selection } from '../src/lib/server/services/stats/selection';
import { demoSignIns } from '../src/lib/server/demo/generate';
import { createDb } from '../src/lib/server/db/client';
import { withShop, type Tx } from '../src/lib/server/db/scope';
import { RULE_IDS } from '../src/lib/domain/control-rules';
import { capabilityByMachinist, capabilityStudy, checkReading, compare, control, distribution, pchart, rates } from '../src/lib/server/services/stats';
import { seedScaled } from './seed';

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

await runMigrations(url);
const sql = postgres(url, { max: 2, onnotice: () => {} });
// BENCH_REUSE=1 (scripts/bench.sh keeps the database): the readings a KEEP_BENCH_DB=1 run seeded.
const [present] = process.env.BENCH_REUSE
	? await sql.begin(async (t) => {
			await t`select set_config('lapmark.system', 'on', true)`;
			return t<{ n: number }[]>`select count(*)::int as n from readings`;
		})
	: [{ n: 0 }];
let readings = present.n;
let readingsInsertMs = 0;
let seedMs = 0;
if (readings > 0) {
	log(`reusing ${readings} readings already in the database (BENCH_REUSE)`);
} else {
	const out = await seedScaled(sql, target, endDate, log);
	seedMs = out.seedMs;
	readingsInsertMs = out.readingsInsertMs;
	readings = out.seeded.counts.readings;
}

// Steady state, as autovacuum leaves it: statistics and visibility maps for every table.
await sql.unsafe('vacuum analyze readings, reading_summaries, reading_value_counts, reading_position_tallies, heads, decisions, limits, families');

const system = <T>(work: (t: postgres.TransactionSql) => Promise<T>) =>
	sql.begin(async (t) => {
		await t`select set_config('lapmark.system', 'on', true)`;
		return work(t);
	}) as Promise<T>;

// ---------------------------------------------------------------------------------------------
// 2. Summaries against a full recomputation

const [consistency] = await system(
	(t) => t<{ moments: number; counts: number; totals: number; groups: number }[]>`
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
			(select count(*)::int from (select shop_id, series_key, family_id, value, sum(n)::int as n from c group by 1, 2, 3, 4) a
				full join reading_value_totals v using (shop_id, series_key, family_id, value)
				where a.n is distinct from v.n) as totals,
			(select count(*)::int from reading_summaries) as groups`
);
log(`summaries: ${consistency.groups} group-months; ${consistency.moments} moment rows, ${consistency.counts} count rows and ${consistency.totals} all-time count rows differ from a full recomputation`);

// The position tallies (drizzle/0013) against the same figures from readings and limits: each
// reading judged by a date-range join on the limit versions, each position's months chained by lag.
const [positionConsistency] = await system(
	(t) => t<{ rows: number; differ: number }[]>`
		with lim as (
			select l.shop_id, l.family_id, lapmark_series(l.measurement, l.stage, l.side) as series_key, l.effective_from, l.min, l.max,
				lead(l.effective_from) over (partition by l.shop_id, l.family_id, l.measurement, l.stage, l.side order by l.effective_from) as until
			from limits l
		), pm as (
			select r.shop_id, r.head_id, r.family_id, r.series_key, r.cylinder, r.valve, lapmark_month(r.measured_at) as month,
				bool_or(r.value < coalesce(l.min, '-Infinity') or r.value > coalesce(l.max, 'Infinity')) as failed
			from readings r join lim l on l.shop_id = r.shop_id and l.family_id = r.family_id and l.series_key = r.series_key
				and l.effective_from <= (r.measured_at at time zone 'UTC')::date and (l.until is null or (r.measured_at at time zone 'UTC')::date < l.until)
			group by 1, 2, 3, 4, 5, 6, 7
		), e as (
			select *, lag(month) over (partition by shop_id, head_id, family_id, series_key, cylinder, valve order by month) as pj,
				lag(month) over (partition by shop_id, head_id, family_id, series_key, cylinder, valve, failed order by month) as pf
			from pm
		), want as (
			select shop_id, series_key, family_id, month, cylinder, prev_month, sum(c)::int as checked, sum(f)::int as failed from (
				select shop_id, series_key, family_id, month, cylinder, coalesce(pj, '-infinity') as prev_month, 1 as c, 0 as f from e
				union all select shop_id, series_key, family_id, month, cylinder, coalesce(pf, '-infinity'), 0, 1 from e where failed) x
			group by 1, 2, 3, 4, 5, 6
		)
		select (select count(*)::int from reading_position_tallies) as rows,
			(select count(*)::int from want w full join reading_position_tallies t using (shop_id, series_key, family_id, month, cylinder, prev_month)
				where w.checked is distinct from t.checked or w.failed is distinct from t.failed) as differ`
);
log(`position tallies: ${positionConsistency.rows} rows; ${positionConsistency.differ} differ from a full recomputation`);

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
const keyFinal = seriesKey('clearance', 'final', 'exhaust');
const finalEnum = `r.measurement = 'clearance' and r.stage = 'final' and r.side = 'exhaust'`;
const enumSeries = (side: string) => `measurement = 'clearance' and stage = 'as_received' and side = '${side}'`;
/** Capability's series: the final exhaust vacuum hold (bounded at 100 %, skewed: the percentile method). */
const keyCap = seriesKey('vacuum_hold', 'final', 'exhaust');
const enumCap = `measurement = 'vacuum_hold' and stage = 'final' and side = 'exhaust'`;
/** Capability's aggregate: the series in time order, its moments, mean moving range, extreme quantiles and readings below the limit. */
const capabilitySql = (series: string, perMachinist = false) => `
		with r as (select value, measured_at, id, measured_by from readings where shop_id = ${lit(ids.shop)} and family_id = ${lit(ids.family)} and ${series}),
		o as (select value, measured_by, abs(value - lag(value) over (${perMachinist ? 'partition by measured_by ' : ''}order by measured_at, id)) as mr from r)
		select ${perMachinist ? 'measured_by, ' : ''}count(*) as n, avg(value) as mean, stddev_samp(value) as sd, avg(mr) as mr_bar,
			percentile_cont(array[0.00135, 0.5, 0.99865]) within group (order by value) as q,
			count(*) filter (where value < 90) as below
		from o${perMachinist ? ' group by 1 order by 1' : ''}`;

/**
 * Every cell of the rates answer from per family × side × cylinder counts `cells`: those, and the
 * sums per family × side, family, side and overall, each with its Wilson 95 % interval.
 */
const rateCells = (cells: string) => `
		cells as (${cells}),
		sums as (select family_id, s, cylinder, sum(n) as n, sum(failures) as f from cells
			group by grouping sets ((family_id, s, cylinder), (family_id, s), (family_id), (s), ())),
		w as (select *, f / n as p, 1.959963984540054 ^ 2 as z2 from sums)
		select family_id, s, cylinder, n, f as failures,
			(p + z2 / (2 * n) - sqrt(z2) * sqrt(p * (1 - p) / n + z2 / (4 * n * n))) / (1 + z2 / n) as low,
			(p + z2 / (2 * n) + sqrt(z2) * sqrt(p * (1 - p) / n + z2 / (4 * n * n))) / (1 + z2 / n) as high
		from w order by 1 nulls first, 2 nulls first, 3 nulls first`;

/** The exhaust as-received clearance limit versions, each with the day the next one starts. */
const versionsOf = (familyId: string | null) => `
		lvd as (select family_id, min, max, effective_from as vfrom,
			lead(effective_from) over (partition by family_id order by effective_from) as vto
			from limits where shop_id = ${lit(ids.shop)}${familyId ? ` and family_id = ${lit(familyId)}` : ''}
			and measurement = 'clearance' and stage = 'as_received' and side = 'exhaust')`;
const beyondDay = (v: string) => `(${v} < coalesce(lvd.min, '-Infinity') or ${v} > coalesce(lvd.max, 'Infinity'))`;
const dayJoin = `r.family_id = lvd.family_id and r.measured_at >= (lvd.vfrom::timestamp at time zone 'UTC')
			and (lvd.vto is null or r.measured_at < (lvd.vto::timestamp at time zone 'UTC'))`;
/** Readings outside the limit version of their day, per family (`od`: judged, outside_day), over readings `r`. */
const byDayRaw = (familyId: string | null) => `${versionsOf(familyId)},
		od as (select r.family_id, count(*) as judged, count(*) filter (where ${beyondDay('r.value')}) as outside_day
			from r join lvd on ${dayJoin} group by 1)`;
/** The same from the summaries, as the route reads it: months wholly inside one version from the
 * per-month value counts, months a version starts in from readings. */
const byDaySummary = (familyId: string | null) => `${versionsOf(familyId)},
		vc as (select family_id, month, value, n from reading_value_counts
			where shop_id = ${lit(ids.shop)} and series_key = ${keyAR('exhaust')}${familyId ? ` and family_id = ${lit(familyId)}` : ''}),
		splitm as (select distinct family_id, date_trunc('month', vfrom)::date as m from lvd where vfrom <> date_trunc('month', vfrom)::date),
		odm as (select vc.family_id, sum(vc.n) as judged, coalesce(sum(vc.n) filter (where ${beyondDay('vc.value')}), 0) as outside_day
			from vc join lvd on lvd.family_id = vc.family_id and vc.month >= lvd.vfrom and (lvd.vto is null or vc.month + interval '1 month' <= lvd.vto)
			group by 1),
		ods as (select r.family_id, count(*) as judged, count(*) filter (where ${beyondDay('r.value')}) as outside_day
			from readings r join splitm on splitm.family_id = r.family_id and r.measured_at >= (splitm.m::timestamp at time zone 'UTC')
				and r.measured_at < ((splitm.m + interval '1 month')::timestamp at time zone 'UTC')
			join lvd on ${dayJoin}
			where r.shop_id = ${lit(ids.shop)} and r.series_key = ${keyAR('exhaust')}${familyId ? ` and r.family_id = ${lit(familyId)}` : ''}
			group by 1),
		od as (select family_id, sum(judged) as judged, sum(outside_day) as outside_day from (select * from odm union all select * from ods) x group by 1)`;

/** The bare SQL of each route's aggregate, with the series given as `where` text. */
const bare = {
	capability: (series: string) => capabilitySql(series),
	capabilityMachinists: (series: string) => capabilitySql(series, true),
	distribution: (series: string) => `
		with r as (select family_id, value, measured_at from readings where shop_id = ${lit(ids.shop)} and family_id = ${lit(ids.family)} and ${series}),
		${byDayRaw(ids.family)},
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
			(select json_agg(hist order by b) from hist) as histogram,
			(select judged from od) as judged, (select outside_day from od) as outside_day
		from f`,
	compare: (series: string) => `
		with r as (select family_id, value, measured_at from readings where shop_id = ${lit(ids.shop)} and ${series}),
		${byDayRaw(null)},
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
		select s.*, m.mad, m.tukey, coalesce(o.outside, 0) as outside, coalesce(od.judged, 0) as judged, coalesce(od.outside_day, 0) as outside_day
		from s join m using (family_id) left join o using (family_id) left join od using (family_id) order by s.q[3]`,
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
		), ${rateCells('select family_id, s, cylinder, count(*) as n, count(*) filter (where failed) as failures from pos group by 1, 2, 3')}`;
	},
	// The control chart: the 1,000 most recent readings with their heads, and the baseline (none
	// is stored in the bench: the first 100 readings of the series).
	control: (series: string) => `
		with w as (select r.id, r.value, r.measured_at, h.serial, r.measured_by, count(*) over () as total
			from readings r join heads h on h.id = r.head_id
			where r.shop_id = ${lit(ids.shop)} and r.family_id = ${lit(ids.family)} and ${series}
			order by r.measured_at desc, r.id desc limit 1000),
		b as (select r.value from readings r where r.shop_id = ${lit(ids.shop)} and r.family_id = ${lit(ids.family)} and ${series}
			order by r.measured_at, r.id limit 100)
		select (select avg(value) from b) as centre, w.* from w`,
	// The p-chart: valve positions judged by the limit version of each reading's day, per month.
	pchart: (series: string) => `
		with lv as (select l.*, lead(l.effective_from) over (partition by l.family_id, l.measurement, l.side, l.stage order by l.effective_from) as effective_to from limits l),
		pos as (
			select r.family_id, lapmark_month(min(r.measured_at)) as month,
				bool_or(r.value < coalesce(lv.min, '-Infinity') or r.value > coalesce(lv.max, 'Infinity')) as failed
			from readings r
			join lv on lv.family_id = r.family_id and lapmark_series(lv.measurement, lv.stage, lv.side) = r.series_key
				and lv.effective_from <= (r.measured_at at time zone 'UTC')::date
				and (lv.effective_to is null or lv.effective_to > (r.measured_at at time zone 'UTC')::date)
			where r.shop_id = ${lit(ids.shop)} and r.family_id = ${lit(ids.family)} and ${series}
			group by r.head_id, r.family_id, r.series_key, r.cylinder, r.valve
		)
		select family_id, month, count(*) as n, count(*) filter (where failed) as failures from pos group by 1, 2 order by 1, 2`,
	check: (series: string) => `
		with r as (select value from readings where shop_id = ${lit(ids.shop)} and family_id = ${lit(ids.family)} and ${series}),
		s as (select count(*) as n, count(*) filter (where value < 0.13) as below, count(*) filter (where value = 0.13) as equal,
			percentile_cont(array[0.25, 0.5, 0.75]) within group (order by value) as q from r)
		select s.*, (select percentile_cont(0.5) within group (order by abs(r.value - s.q[2])) from r) as mad,
			(select max from limits where shop_id = ${lit(ids.shop)} and family_id = ${lit(ids.family)} and measurement = 'clearance'
				and stage = 'as_received' and side = 'exhaust' and effective_from <= current_date order by effective_from desc limit 1) as max
		from s`
};

/**
 * The same figures read from the summaries, by hand in one statement: a selection without dates
 * reads the all-time frequency tables (reading_value_totals), so moments by the two-pass formula
 * over the counts; type-7 quantiles and the MAD as cumulative counts (readings are quantised, so
 * the table is exact: the k-th smallest reading is the value whose cumulative count first exceeds
 * k); Tukey and limit counts and the histogram from the counts. This is what the routes read,
 * without HTTP, the token, the transaction or the app's own work. Rates: below, from the position
 * tallies.
 */
const fromSummaries = (familyId: string | null) => {
	const where = `shop_id = ${lit(ids.shop)} and series_key = ${keyAR('exhaust')}${familyId ? ` and family_id = ${lit(familyId)}` : ''}`;
	/** The (0-based) k-th smallest of cumulative table `t` (family_id, x, n, upto), joined as `as`. */
	const kth = (t: string, as: string, fam: string, k: string) => `join ${t} ${as} on ${as}.family_id = ${fam} and ${as}.upto - ${as}.n <= ${k} and ${k} < ${as}.upto`;
	/** Type-7 interpolation between the floor(h)-th and ceil(h)-th smallest. */
	const type7 = (h: string) => `lo.x + (${h} - floor(${h})) * (hi.x - lo.x)`;
	return `
		c as (select family_id, value, n from reading_value_totals where ${where}),
		mo as (select family_id, sum(n) as n, sum(n * value) / sum(n) as mean, min(value) as mn, max(value) as mx from c group by 1),
		mm as (select mo.*, sqrt((select sum(c.n * (c.value - mo.mean) ^ 2) from c where c.family_id = mo.family_id) / nullif(mo.n - 1, 0)) as sd from mo),
		cum as (select family_id, value as x, n, sum(n) over (partition by family_id order by value) as upto from c),
		ps as (select mm.family_id, p, (mm.n - 1) * p as h from mm, unnest(array[0.05, 0.25, 0.5, 0.75, 0.95]) p),
		qs as (select ps.family_id, array_agg(${type7('ps.h')} order by ps.p) as q from ps
			${kth('cum', 'lo', 'ps.family_id', 'floor(ps.h)')} ${kth('cum', 'hi', 'ps.family_id', 'ceil(ps.h)')} group by 1),
		s as (select mm.*, qs.q, qs.q[2] - 1.5 * (qs.q[4] - qs.q[2]) as lo, qs.q[4] + 1.5 * (qs.q[4] - qs.q[2]) as hi from mm join qs using (family_id)),
		dev as (select c.family_id, abs(c.value - s.q[3]) as d, sum(c.n) as n from c join s using (family_id) group by 1, 2),
		dcum as (select family_id, d as x, n, sum(n) over (partition by family_id order by d) as upto from dev),
		mads as (select s.family_id, ${type7('(s.n - 1) * 0.5')} as mad from s
			${kth('dcum', 'lo', 's.family_id', 'floor((s.n - 1) * 0.5)')} ${kth('dcum', 'hi', 's.family_id', 'ceil((s.n - 1) * 0.5)')}),
		tk as (select c.family_id, sum(c.n) filter (where c.value < s.lo or c.value > s.hi) as tukey from c join s using (family_id) group by 1)`;
};
const limitOf = (familyId: string | null) => `
		lim as (select distinct on (family_id) family_id, min, max from limits where shop_id = ${lit(ids.shop)}${familyId ? ` and family_id = ${lit(familyId)}` : ''}
			and measurement = 'clearance' and stage = 'as_received' and side = 'exhaust' and effective_from <= current_date
			order by family_id, effective_from desc)`;
const summaryBare: Record<'distribution' | 'compare' | 'rates' | 'check', string> = {
	distribution: `
		with ${fromSummaries(ids.family)}, ${limitOf(ids.family)}, ${byDaySummary(ids.family)},
		f as (select s.*, least(60, greatest(5, ceil((mx - mn) / nullif(2 * (q[4] - q[2]) / cbrt(n), 0))))::int as k from s),
		hist as (select width_bucket(c.value, f.mn, f.mx * (1 + 1e-12), coalesce(f.k, 60)) as b, sum(c.n) as n from c, f group by 1)
		select f.n, f.mean, f.sd, f.mn, f.mx, f.q, f.lo, f.hi, f.k, mads.mad, tk.tukey,
			(select coalesce(sum(c.n), 0) from c, lim where c.value < coalesce(lim.min, '-Infinity') or c.value > coalesce(lim.max, 'Infinity')) as outside,
			(select json_agg(hist order by b) from hist) as histogram,
			(select judged from od) as judged, (select outside_day from od) as outside_day
		from f join mads using (family_id) join tk using (family_id)`,
	compare: `
		with ${fromSummaries(null)}, ${limitOf(null)}, ${byDaySummary(null)},
		o as (select c.family_id, sum(c.n) as outside from c join lim using (family_id)
			where c.value < coalesce(lim.min, '-Infinity') or c.value > coalesce(lim.max, 'Infinity') group by 1)
		select s.family_id, s.n, s.mean, s.sd, s.mn, s.mx, s.q, mads.mad, tk.tukey, coalesce(o.outside, 0) as outside,
			coalesce(od.judged, 0) as judged, coalesce(od.outside_day, 0) as outside_day
		from s join mads using (family_id) join tk using (family_id) left join o using (family_id) left join od using (family_id) order by s.q[3]`,
	// Without dates, each position's first judged month is its entry with no month before it.
	rates: `
		with ${rateCells(`
			select family_id, series_key as s, cylinder, sum(checked) as n, sum(failed) as failures
			from reading_position_tallies
			where shop_id = ${lit(ids.shop)} and series_key in (${keyAR('intake')}, ${keyAR('exhaust')}) and prev_month = '-infinity'
			group by 1, 2, 3 having sum(checked) > 0`)}`,
	check: `
		with ${fromSummaries(ids.family)}, ${limitOf(ids.family)}
		select s.n, (select sum(n) from c where value < 0.13) as below, (select sum(n) from c where value = 0.13) as equal,
			s.q[2:4] as q, mads.mad, (select max from lim) as max
		from s join mads using (family_id)`
};

/** For scale: the same kind of aggregate over every reading of every shop, per shop × family × series. */
const wholeTable = `
		with s as (select shop_id, family_id, series_key, count(*) as n, avg(value) as mean, stddev_samp(value) as sd, min(value) as mn, max(value) as mx,
			percentile_cont(array[0.05, 0.25, 0.5, 0.75, 0.95]) within group (order by value) as q from readings group by 1, 2, 3)
		select s.*, percentile_cont(0.5) within group (order by abs(r.value - s.q[3])) as mad,
			count(*) filter (where r.value < s.q[2] - 1.5 * (s.q[4] - s.q[2]) or r.value > s.q[4] + 1.5 * (s.q[4] - s.q[2])) as tukey
		from readings r join s using (shop_id, family_id, series_key)
		group by s.shop_id, s.family_id, s.series_key, s.n, s.mean, s.sd, s.mn, s.mx, s.q`;

const byKey = {
	capability: `series_key = ${keyCap}`,
	capabilityMachinists: `series_key = ${keyCap}`,
	distribution: `series_key = ${keyAR('exhaust')}`,
	compare: `series_key = ${keyAR('exhaust')}`,
	rates: `r.series_key in (${keyAR('intake')}, ${keyAR('exhaust')})`,
	check: `series_key = ${keyAR('exhaust')}`,
	control: `r.series_key = ${keyFinal}`,
	pchart: `r.series_key = ${keyFinal}`
};
const byEnum = {
	capability: enumCap,
	capabilityMachinists: enumCap,
	distribution: enumSeries('exhaust'),
	compare: enumSeries('exhaust'),
	rates: `r.measurement = 'clearance' and r.stage = 'as_received'`,
	check: enumSeries('exhaust'),
	control: finalEnum,
	pchart: finalEnum
};

// The summary SQL must give the raw SQL's figures (a check of the hand-written SQL above, and
// once more of the summaries themselves); and how many readings each selection holds.
const asShop = (q: string) =>
	sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${ids.shop}, true)`;
		return t.unsafe(q);
	}) as Promise<Record<string, unknown>[]>;
/** Differences between two result sets, numbers compared to 1e-9 relative (strings that hold numbers too). */
function differences(a: unknown, b: unknown, path = ''): string[] {
	const num = (x: unknown) => (typeof x === 'number' ? x : typeof x === 'string' && x.trim() !== '' && !Number.isNaN(Number(x)) ? Number(x) : null);
	const [x, y] = [num(a), num(b)];
	if (x !== null && y !== null) return Math.abs(x - y) <= 1e-9 * Math.max(1, Math.abs(x), Math.abs(y)) ? [] : [`${path}: ${a} vs ${b}`];
	if (Array.isArray(a) && Array.isArray(b)) {
		if (a.length !== b.length) return [`${path}: ${a.length} vs ${b.length} items`];
		return a.flatMap((v, i) => differences(v, b[i], `${path}[${i}]`));
	}
	if (a && b && typeof a === 'object' && typeof b === 'object') {
		const keys = Object.keys(a).filter((k) => k in b);
		return keys.flatMap((k) => differences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`));
	}
	return a === b ? [] : [`${path}: ${JSON.stringify(a)} vs ${JSON.stringify(b)}`];
}
const byFamily = (rows: Record<string, unknown>[]) => [...rows].sort((p, q) => String(p.family_id ?? '').localeCompare(String(q.family_id ?? '')));
for (const name of ['distribution', 'compare', 'rates', 'check'] as const) {
	const [raw, summary] = [byFamily(await asShop(bare[name](byKey[name]))), byFamily(await asShop(summaryBare[name]))];
	const diff = differences(raw, summary);
	if (diff.length) throw new Error(`the summary SQL of ${name} differs from its raw SQL: ${diff.slice(0, 5).join('; ')}`);
}
const [selected] = (await asShop(`
	select count(*) filter (where family_id = ${lit(ids.family)} and series_key = ${keyAR('exhaust')})::int as distribution,
		count(*) filter (where series_key = ${keyAR('exhaust')})::int as compare, count(*) filter (where ${byKey.rates})::int as rates,
		count(*) filter (where family_id = ${lit(ids.family)} and series_key = ${keyFinal})::int as final
	from readings r where r.shop_id = ${lit(ids.shop)}`)) as { distribution: number; compare: number; rates: number; final: number }[];
log(`summary SQL agrees with raw SQL for distribution, compare, rates and check`);

const routes = {
	distribution: '/api/v1/stats/distribution?measurement=clearance&family=ALDER-4&side=exhaust&stage=as_received',
	compare: '/api/v1/stats/compare?measurement=clearance&side=exhaust&stage=as_received',
	rates: '/api/v1/stats/rates?check=clearance',
	check: '/api/v1/check?family=ALDER-4&side=exhaust&measurement=clearance&value=0.13',
	control: '/api/v1/stats/control?family=ALDER-4&side=exhaust&measurement=clearance&stage=final&limit=1000&rules=all',
	pchart: '/api/v1/stats/pchart?family=ALDER-4&side=exhaust&measurement=clearance&stage=final',
	capability: '/api/v1/stats/capability?family=ALDER-4&side=exhaust&measurement=vacuum_hold',
	capabilityMachinists: '/api/v1/stats/capability/machinists?family=ALDER-4&side=exhaust&measurement=vacuum_hold'
} as const;
type Route = keyof typeof routes;

const dir = mkdtempSync(join(tmpdir(), 'lapmark-bench-'));
/** Times of a statement through psql (client-side \timing, output discarded) after up to 3 untimed
 * runs, as the app's role with the bench shop set (or, for `scope: 'system'`, across shops). */
function psqlTimes(query: string, opts: { runs?: number; scope?: 'shop' | 'system' } = {}): number[] {
	const n = opts.runs ?? runs;
	const file = join(dir, 'q.sql');
	const scope = opts.scope === 'system' ? `set lapmark.system = 'on';` : `set lapmark.shop_id = '${ids.shop}';`;
	const body = [`\\set ON_ERROR_STOP on`, scope, '\\o /dev/null', ...Array(Math.min(3, n)).fill(`${query};`), '\\timing on', ...Array(n).fill(`${query};`)];
	writeFileSync(file, body.join('\n') + '\n');
	const out = spawnSync(psqlBin, ['-X', '-q', '-d', url!, '-f', file], { encoding: 'utf8' });
	if (out.status !== 0) throw new Error(`psql failed: ${out.stderr}`);
	const times = [...out.stdout.matchAll(/Time: ([\d.]+) ms/g)].map((m) => Number(m[1]));
	if (times.length !== n) throw new Error(`psql printed ${times.length} timings, expected ${n}`);
	return times;
}
const psqlMedian = (query: string, opts: { runs?: number; scope?: 'shop' | 'system' } = {}) => median(psqlTimes(query, opts));

const server = spawn('node', ['server.js'], {
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

	const httpTimes = async (path: string, n = runs) => {
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
		for (let i = 0; i < n; i++) times.push(await once());
		return times;
	};
	const httpMedian = async (path: string) => median(await httpTimes(path));
	// A freshly started server runs the request path in V8's interpreter; timing its first few
	// dozen requests measures the JIT, not the route (GET /api/v1/me: ~7 ms cold, ~3 ms warm).
	const warmup = Number(process.env.BENCH_WARMUP ?? 40);
	for (const path of ['/api/v1/me', ...Object.values(routes)]) await httpTimes(path, warmup);

	// The floor every API request pays: token lookup, a transaction, JSON.
	const floorMs = r1(await httpMedian('/api/v1/me'));
	// The same work in this process, straight on a database connection: the engine without HTTP.
	const app = createDb(url!, { max: 1 });
	const services: Record<Route, () => Promise<unknown>> = {
		distribution: () => withShop(app.db, ids.shop, (t) => distribution(t, ids.shop, { measurement: 'clearance', family: 'ALDER-4', side: 'exhaust', stage: 'as_received' })),
		compare: () => withShop(app.db, ids.shop, (t) => compare(t, ids.shop, { measurement: 'clearance', side: 'exhaust', stage: 'as_received' })),
		rates: () => withShop(app.db, ids.shop, (t) => rates(t, ids.shop, { check: { kind: 'measurement', measurement: 'clearance' } })),
		check: () => withShop(app.db, ids.shop, (t) => checkReading(t, ids.shop, { family: 'ALDER-4', side: 'exhaust', stage: 'as_received', measurement: 'clearance', value: 0.13 })),
		control: () => withShop(app.db, ids.shop, (t) => control(t, ids.shop, { family: 'ALDER-4', side: 'exhaust', stage: 'final', measurement: 'clearance', limit: 1000, rules: [...RULE_IDS] })),
		pchart: () => withShop(app.db, ids.shop, (t) => pchart(t, ids.shop, { family: 'ALDER-4', side: 'exhaust', stage: 'final', measurement: 'clearance' })),
		capability: () => withShop(app.db, ids.shop, (t) => capabilityStudy(t, ids.shop, { family: 'ALDER-4', side: 'exhaust', measurement: 'vacuum_hold', stage: 'final' })),
		capabilityMachinists: () => withShop(app.db, ids.shop, (t) => capabilityByMachinist(t, ids.shop, { family: 'ALDER-4', side: 'exhaust', measurement: 'vacuum_hold', stage: 'final' }))
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

	// The route's own reads, without its statistics, HTTP or token: each call timed inside one
	// scoped transaction, as psql times one statement. For rates, the comparison the issue means
	// by "within 1.0× of the bare summary read": its family lookup and its one read of the tallies
	// against the hand-written read of the same tallies (dbRatio). Over HTTP both are a few ms and
	// the floor every request pays (the token, a transaction, JSON) dominates.
	const routeReads: Partial<Record<Route, (t: Tx) => Promise<unknown>>> = {
		rates: async (t) => {
			await resolveFamily(t, ids.shop, undefined);
			await measurementTallies(t, ids.shop, selection({}, seriesKeys('clearance', defaultRateStage('clearance'), null), null));
		}
	};
	const readsTimes = (f: NonNullable<(typeof routeReads)[Route]>, n: number) =>
		withShop(app.db, ids.shop, async (t) => {
			for (let i = 0; i < 3; i++) await f(t);
			const times: number[] = [];
			for (let i = 0; i < n; i++) {
				const t0 = performance.now();
				await f(t);
				times.push(performance.now() - t0);
			}
			return times;
		});

	type Result = {
		ms: number;
		sqlMs: number;
		ratio: number;
		summarySqlMs: number | null;
		summaryRatio: number | null;
		sqlEnumMs: number;
		serviceMs: number;
		routeDbMs: number | null;
		dbRatio: number | null;
	};
	const results = {} as Record<Route, Result>;
	const ratio = (a: number, b: number) => Math.round((a / b) * 100) / 100;
	// The route and its SQL baselines are timed in alternating blocks (BENCH_BLOCKS, default 4, of
	// runs / blocks each), so that a burst of load from elsewhere on the machine falls on both
	// sides of a ratio rather than on one; the medians are over all the runs.
	const blocks = Math.max(1, Math.min(runs, Number(process.env.BENCH_BLOCKS ?? 4)));
	for (const name of Object.keys(routes) as Route[]) {
		const t = { http: [] as number[], sql: [] as number[], summary: [] as number[], reads: [] as number[] };
		const reads = routeReads[name];
		for (let b = 0; b < blocks; b++) {
			const n = Math.floor(runs / blocks) + (b < runs % blocks ? 1 : 0);
			t.http.push(...(await httpTimes(routes[name], n)));
			t.sql.push(...psqlTimes(bare[name](byKey[name]), { runs: n }));
			// Capability, control and the p-chart keep no summaries of their own.
			const summaryQ = (summaryBare as Partial<Record<Route, string>>)[name];
			if (summaryQ) t.summary.push(...psqlTimes(summaryQ, { runs: n }));
			if (reads) t.reads.push(...(await readsTimes(reads, n)));
		}
		const routeDbMs = t.reads.length ? median(t.reads) : null;
		const ms = median(t.http);
		const sqlMs = median(t.sql);
		const summarySqlMs = t.summary.length ? median(t.summary) : null;
		const sqlEnumMs = psqlMedian(bare[name](byEnum[name]));
		const serviceMs = await inProcess(services[name]);
		results[name] = {
			ms: r1(ms),
			sqlMs: r1(sqlMs),
			ratio: ratio(ms, sqlMs),
			summarySqlMs: summarySqlMs === null ? null : r1(summarySqlMs),
			summaryRatio: summarySqlMs === null ? null : ratio(ms, summarySqlMs),
			sqlEnumMs: r1(sqlEnumMs),
			serviceMs: r1(serviceMs),
			routeDbMs: routeDbMs === null ? null : r1(routeDbMs),
			dbRatio: routeDbMs === null || summarySqlMs === null ? null : ratio(routeDbMs, summarySqlMs)
		};
	}
	await app.sql.end();
	const wholeTableMs = process.env.BENCH_WHOLE === '0' ? null : r1(psqlMedian(wholeTable, { runs: 3, scope: 'system' }));

	const cell = (x: number | null, w: number, digits?: number) => (x === null ? '–' : digits === undefined ? String(x) : x.toFixed(digits)).padStart(w);
	console.log(`\nStatistics routes at ${readings.toLocaleString('en-US')} readings (median of ${runs}, in ${blocks} alternating blocks; HTTP with an API token vs psql, both with row-level security)`);
	console.log('route          HTTP ms   raw SQL ms   ratio   summary SQL ms   summary ratio   in-process ms   raw SQL on enum columns ms');
	for (const [name, r] of Object.entries(results)) {
		console.log(
			`${name.padEnd(14)} ${cell(r.ms, 7)}   ${cell(r.sqlMs, 10)}   ${cell(r.ratio, 5, 2)}   ${cell(r.summarySqlMs, 14)}   ${cell(r.summaryRatio, 13, 2)}   ${cell(r.serviceMs, 13)}   ${cell(r.sqlEnumMs, 10)}`
		);
	}
	console.log('raw SQL: the bare aggregate over the readings of the same selection (percentile_cont, avg, stddev_samp, Tukey and limit');
	console.log('counts), filtered on series_key, the index a person would use; "ratio" is HTTP / raw SQL, as the targets mean it.');
	console.log('summary SQL: the same figures read by hand from the summaries in one statement (rates: reading_position_tallies), which');
	console.log('is what the routes read; "summary ratio" is HTTP / summary SQL. "enum columns" filters');
	console.log('measurement/stage/side, which row-level security keeps out of any index scan. In-process: the service on a direct');
	console.log('connection, no HTTP and no token.');
	console.log(`selections: distribution and check ${selected.distribution.toLocaleString('en-US')} readings (one family × series), control and pchart ${selected.final.toLocaleString('en-US')} (ALDER-4 final exhaust clearance; control charts the latest 1,000), compare ${selected.compare.toLocaleString('en-US')} (every family, one series), rates ${selected.rates.toLocaleString('en-US')} (every family, two series)`);
	if (wholeTableMs !== null) console.log(`for scale: that raw aggregate over all ${readings.toLocaleString('en-US')} readings, per shop × family × series: ${wholeTableMs} ms (median of 3)`);
	console.log(`(GET /api/v1/me, the token check alone: ${floorMs} ms)`);
	for (const [name, r] of Object.entries(results)) {
		if (r.routeDbMs !== null) {
			console.log(`${name}: the route's own reads in-process ${r.routeDbMs} ms against the summary SQL's ${r.summarySqlMs} ms: ${r.dbRatio}× (target ≤ 1.0; HTTP ${r.ms} ms, of which the floor above)`);
		}
	}
	console.log(`capability: the final exhaust vacuum hold of ALDER-4 in time order (whole and per machinist), against its raw aggregate (moments, moving ranges, extreme quantiles)`);
	console.log(`targets: distribution, compare, rates, control, pchart, capability under 300 ms and within 1.5× of raw SQL; check under 20 ms; rates under 20 ms and within 1.0× of its summary SQL`);

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
			`readings triggers, ${readings.toLocaleString('en-US')} rows in one statement: insert ${trigger.insertWithMs} ms with, ${trigger.insertWithoutMs} ms without; delete ${trigger.deleteWithMs} ms with, ${trigger.deleteWithoutMs} ms without`
		);
	}

	const line = {
		readings,
		routes: Object.fromEntries(
			Object.entries(results).map(([k, v]) => [
				k,
				{ ms: v.ms, sqlMs: v.sqlMs, ratio: v.ratio, ...(v.summarySqlMs === null ? {} : { summarySqlMs: v.summarySqlMs, summaryRatio: v.summaryRatio }),
					...(v.routeDbMs === null ? {} : { routeDbMs: v.routeDbMs, dbRatio: v.dbRatio })
				}
			])
		),
		selectedReadings: selected,
		wholeTableSqlMs: wholeTableMs,
		apiFloorMs: floorMs,
		sqlOnEnumColumnsMs: Object.fromEntries(Object.entries(results).map(([k, v]) => [k, v.sqlEnumMs])),
		inProcessMs: Object.fromEntries(Object.entries(results).map(([k, v]) => [k, v.serviceMs])),
		loadAverage: loadavg()[0],
		seed: { ms: Math.round(seedMs), readingsInsertMs: readingsInsertMs },
		summariesMismatched: consistency.moments + consistency.counts + consistency.totals + positionConsistency.differ,
		positionTallies: positionConsistency.rows,
		trigger
	};
	console.log(JSON.stringify(line));
} finally {
	if (server.exitCode === null && server.signalCode === null) server.kill('SIGTERM');
	rmSync(dir, { recursive: true, force: true });
	await sql.end();
}
