// SQL behind the statistics API. Heavy aggregation happens here; services/stats.ts finishes the
// work with the pure functions in stats/.
//
// Where the numbers come from:
// - Distributions (count, moments, quantiles, fences, histograms) come from the per-month
//   summaries the readings triggers maintain (reading_summaries, reading_value_counts), for every
//   whole month in the date range; the partial months at either end, and any filter the
//   summaries cannot answer (machinist, customer, mileage), read readings themselves.
// - Rates, outliers, capability, control charts and wear read readings (and decisions, heads).
//
// Every query filters readings on series_key rather than on measurement/stage/side: row-level
// security lets an index use only leakproof comparisons, and enum equality is not leakproof.
import { sql, type SQL } from 'drizzle-orm';
import { addDays } from '../../domain/days';
import type { Side } from '../../measurements';
import type { Conn } from '../db/scope';
import { expandCounts, mergeMoments, momentsOf, type Moments, type ValueCount } from '../stats';
import { LIMIT_VERSIONS } from './overview';

// ---------------------------------------------------------------------------------------------
// Families and limits

export type FamilyRef = {
	id: string;
	code: string;
	cylinders: number;
};

export async function shopFamilies(conn: Conn, shopId: string): Promise<FamilyRef[]> {
	return conn.execute<FamilyRef>(sql`
		select id, code, cylinders from families where shop_id = ${shopId} order by code`);
}

export type LimitRow = {
	familyId: string;
	key: number;
	min: number | null;
	max: number | null;
	effectiveFrom: string;
};

/** The limit versions in force on `day`, one per family × series (optionally only some). */
export async function limitsOn(conn: Conn, shopId: string, day: string, only?: { familyIds?: string[] | null; keys?: number[] }): Promise<LimitRow[]> {
	const where: SQL[] = [sql`shop_id = ${shopId}`, sql`effective_from <= ${day}::date`];
	if (only?.familyIds) where.push(sql`family_id = any(${pgArray(only.familyIds)}::uuid[])`);
	if (only?.keys) where.push(sql`lapmark_series(measurement, stage, side) = any(${pgArray(only.keys)}::int2[])`);
	return conn.execute<LimitRow>(sql`
		select distinct on (family_id, measurement, side, stage)
			family_id as "familyId", lapmark_series(measurement, stage, side) as key, min, max,
			effective_from::text as "effectiveFrom"
		from limits
		where ${sql.join(where, sql` and `)}
		order by family_id, measurement, side, stage, effective_from desc`);
}

// ---------------------------------------------------------------------------------------------
// Selections

/** What a statistics request looks at; every field narrows it. */
export interface Selection {
	/** null: every family of the shop. */
	familyIds: string[] | null;
	/** Series keys (measurement × stage × side); never empty. */
	keys: number[];
	/** Inclusive UTC days of measured_at. */
	from: string | null;
	to: string | null;
	machinist: string | null;
	customer: string | null;
	mileageMin: number | null;
	mileageMax: number | null;
}

/** A PostgreSQL array literal for a text parameter cast to an array type (uuids, numbers). */
export function pgArray(values: readonly (string | number)[]): string {
	for (const v of values) {
		if (typeof v === 'number' ? !Number.isFinite(v) : !/^[0-9a-f-]+$/i.test(v)) throw new RangeError(`cannot pass ${v} in an array`);
	}
	return `{${values.join(',')}}`;
}

export { addDays };
function monthStart(day: string): string {
	return `${day.slice(0, 7)}-01`;
}
function nextMonth(day: string): string {
	const d = new Date(`${monthStart(day)}T00:00:00Z`);
	d.setUTCMonth(d.getUTCMonth() + 1);
	return d.toISOString().slice(0, 10);
}
const stamp = (day: string) => `${day}T00:00:00Z`;

/** A half-open interval of measured_at, [start, end), as UTC days; null is unbounded. */
export interface DayRange {
	start: string | null;
	end: string | null;
}

export interface Window {
	/** Whole months the summaries answer for: month ∈ [monthFrom, monthTo); null when none. */
	months: DayRange | null;
	/** The rest of the range, read from readings. */
	edges: DayRange[];
}

/**
 * Splits an inclusive day range into the whole calendar months (UTC) inside it, which the
 * summaries answer, and the partial months at either end, which are read from readings.
 */
export function splitWindow(from: string | null, to: string | null): Window {
	const end = to ? addDays(to, 1) : null;
	const fullFrom = from ? (from === monthStart(from) ? from : nextMonth(from)) : null;
	const fullEnd = end ? monthStart(end) : null;
	if (fullFrom && fullEnd && fullFrom >= fullEnd) return { months: null, edges: [{ start: from, end }] };
	const edges: DayRange[] = [];
	if (from && fullFrom && from < fullFrom) edges.push({ start: from, end: fullFrom });
	if (end && fullEnd && fullEnd < end) edges.push({ start: fullEnd, end });
	return { months: { start: fullFrom, end: fullEnd }, edges };
}

/** Does the selection need readings whatever the dates (a filter the summaries do not keep)? */
export function needsReadings(sel: Selection): boolean {
	return sel.machinist !== null || sel.customer !== null || sel.mileageMin !== null || sel.mileageMax !== null;
}

/** Filters on readings `r` (and its head), for the selection, optionally within `ranges`. */
export function readingsWhere(shopId: string, sel: Selection, ranges?: readonly DayRange[]): SQL {
	const parts: SQL[] = [sql`r.shop_id = ${shopId}`, sql`r.series_key = any(${pgArray(sel.keys)}::int2[])`];
	if (sel.familyIds) parts.push(sql`r.family_id = any(${pgArray(sel.familyIds)}::uuid[])`);
	if (sel.from) parts.push(sql`r.measured_at >= ${stamp(sel.from)}::timestamptz`);
	if (sel.to) parts.push(sql`r.measured_at < ${stamp(addDays(sel.to, 1))}::timestamptz`);
	if (ranges) {
		const alternatives = ranges.map((g) => {
			const c: SQL[] = [];
			if (g.start) c.push(sql`r.measured_at >= ${stamp(g.start)}::timestamptz`);
			if (g.end) c.push(sql`r.measured_at < ${stamp(g.end)}::timestamptz`);
			return c.length ? sql`(${sql.join(c, sql` and `)})` : sql`true`;
		});
		parts.push(alternatives.length ? sql`(${sql.join(alternatives, sql` or `)})` : sql`false`);
	}
	if (sel.machinist) parts.push(sql`lower(r.measured_by) = lower(${sel.machinist})`);
	const head: SQL[] = [];
	if (sel.customer) head.push(sql`lower(h.customer) = lower(${sel.customer})`);
	if (sel.mileageMin !== null) head.push(sql`h.mileage_km >= ${sel.mileageMin}`);
	if (sel.mileageMax !== null) head.push(sql`h.mileage_km <= ${sel.mileageMax}`);
	if (head.length) {
		parts.push(sql`r.head_id in (select h.id from heads h where h.shop_id = ${shopId} and ${sql.join(head, sql` and `)})`);
	}
	return sql.join(parts, sql` and `);
}

// ---------------------------------------------------------------------------------------------
// Distributions

/** One family × series of the selection: its moments and its exact frequency table. */
export interface GroupData {
	familyId: string;
	key: number;
	moments: Moments;
	/** Sorted by value. */
	counts: ValueCount[];
}

export type DataSource = 'summaries' | 'summaries+readings' | 'readings';

type CountRow = {
	familyId: string;
	key: number;
	value: number;
	n: number;
};
type MomentRow = {
	familyId: string;
	key: number;
	n: number;
	mean: number;
	m2: number;
	min: number;
	max: number;
};

/**
 * Moments and frequency tables of every family × series in the selection. `source: 'readings'`
 * ignores the summaries (the tests compare both ways); `moments: false` leaves the moments empty
 * when only the frequency tables are needed.
 */
export async function groupData(
	conn: Conn,
	shopId: string,
	sel: Selection,
	opts: { source?: 'auto' | 'readings'; moments?: boolean } = {}
): Promise<{ groups: GroupData[]; source: DataSource }> {
	const acc = new Map<string, { familyId: string; key: number; moments: Moments | null; counts: Map<number, number>; edge: Map<number, number> }>();
	const slot = (familyId: string, key: number) => {
		const id = `${familyId}|${key}`;
		let s = acc.get(id);
		if (!s) acc.set(id, (s = { familyId, key, moments: null, counts: new Map(), edge: new Map() }));
		return s;
	};
	const fromReadings = async (ranges?: DayRange[]) => {
		const rows = await conn.execute<CountRow>(sql`
			select r.family_id as "familyId", r.series_key as key, r.value, count(*)::int as n
			from readings r where ${readingsWhere(shopId, sel, ranges)}
			group by 1, 2, 3`);
		for (const r of rows) {
			const s = slot(r.familyId, r.key);
			s.counts.set(r.value, (s.counts.get(r.value) ?? 0) + r.n);
			s.edge.set(r.value, (s.edge.get(r.value) ?? 0) + r.n);
		}
	};

	let source: DataSource;
	if (opts.source === 'readings' || needsReadings(sel)) {
		source = 'readings';
		await fromReadings();
	} else {
		const win = splitWindow(sel.from, sel.to);
		source = win.edges.length ? (win.months ? 'summaries+readings' : 'readings') : 'summaries';
		if (win.months) {
			const where: SQL[] = [sql`shop_id = ${shopId}`, sql`series_key = any(${pgArray(sel.keys)}::int2[])`];
			if (sel.familyIds) where.push(sql`family_id = any(${pgArray(sel.familyIds)}::uuid[])`);
			if (win.months.start) where.push(sql`month >= ${win.months.start}::date`);
			if (win.months.end) where.push(sql`month < ${win.months.end}::date`);
			const cond = sql.join(where, sql` and `);
			if (win.months.start === null && win.months.end === null) {
				// No dates at all: the all-time frequency tables, a row per value rather than one per
				// value and month. Counts are exact, so the moments come from them too (two-pass, below)
				// and the per-month moments are not read.
				const counts = await conn.execute<CountRow>(sql`
					select family_id as "familyId", series_key as key, value, n
					from reading_value_totals where ${cond}`);
				for (const c of counts) {
					const s = slot(c.familyId, c.key);
					s.counts.set(c.value, c.n);
					s.edge.set(c.value, c.n);
				}
			} else {
				const [moments, counts] = await Promise.all([
					opts.moments === false
						? ([] as MomentRow[])
						: conn.execute<MomentRow>(sql`
								select family_id as "familyId", series_key as key, n, mean, m2, min, max
								from reading_summaries where ${cond}`),
					conn.execute<CountRow>(sql`
						select family_id as "familyId", series_key as key, value, sum(n)::int as n
						from reading_value_counts where ${cond}
						group by 1, 2, 3`)
				]);
				for (const m of moments) {
					const s = slot(m.familyId, m.key);
					const part: Moments = { n: m.n, mean: m.mean, m2: m.m2, min: m.min, max: m.max };
					s.moments = s.moments ? mergeMoments(s.moments, part) : part;
				}
				for (const c of counts) slot(c.familyId, c.key).counts.set(c.value, c.n);
			}
		}
		if (win.edges.length) await fromReadings(win.edges);
	}

	const groups: GroupData[] = [];
	for (const s of acc.values()) {
		const counts = [...s.counts].filter(([, n]) => n > 0).sort((a, b) => a[0] - b[0]) as ValueCount[];
		// Counts read whole (readings read directly, the edges of a date range, or the all-time
		// tables): their moments by the two-pass formula, merged into any stored ones (Chan et al.).
		const edge = s.edge.size && opts.moments !== false ? momentsOf(expandCounts([...s.edge].sort((a, b) => a[0] - b[0]))) : null;
		const moments = s.moments && edge ? mergeMoments(s.moments, edge) : (s.moments ?? edge ?? momentsOf([]));
		groups.push({ familyId: s.familyId, key: s.key, moments, counts });
	}
	groups.sort((a, b) => (a.familyId < b.familyId ? -1 : a.familyId > b.familyId ? 1 : a.key - b.key));
	return { groups, source };
}

// ---------------------------------------------------------------------------------------------
// Outliers

export interface OutlierParams {
	familyId: string;
	key: number;
	low: number | null;
	high: number | null;
	median: number | null;
	mad: number | null;
}

export type OutlierRow = {
	/** Reading ids are bigints; they stay far below 2^53, so float8 carries them exactly. */
	id: number;
	familyId: string;
	key: number;
	headId: string;
	serial: string;
	cylinder: number;
	side: Side;
	valve: number;
	value: number;
	measuredAt: Date;
	measuredBy: string;
	limitMin: number | null;
	limitMax: number | null;
	limitFrom: string | null;
	z: number | null;
	total: number;
};

const OUTLIER_ORDER: Record<string, SQL> = {
	measuredAt: sql`x.measured_at asc, x.id asc`,
	'-measuredAt': sql`x.measured_at desc, x.id desc`,
	value: sql`x.value asc, x.id asc`,
	'-value': sql`x.value desc, x.id desc`,
	z: sql`abs(x.z) asc nulls last, x.id asc`,
	'-z': sql`abs(x.z) desc nulls last, x.id desc`
};

/**
 * Readings of the selection outside the limits of their day, outside their group's Tukey fences
 * or with |modified z| above `zLimit` (z = factor·(x − median)/MAD, the same arithmetic as
 * stats/robust.ts), one page in the given order, each with the total count.
 */
export async function outlierPage(
	conn: Conn,
	shopId: string,
	sel: Selection,
	groups: readonly OutlierParams[],
	opts: { factor: number; zLimit: number; sort: string; limit: number; offset: number }
): Promise<OutlierRow[]> {
	if (groups.length === 0) return [];
	const arr = (xs: (number | null)[]) => `{${xs.map((x) => (x === null ? 'NULL' : String(x))).join(',')}}`;
	const order = OUTLIER_ORDER[opts.sort] ?? OUTLIER_ORDER['-measuredAt'];
	return conn.execute<OutlierRow>(sql`
		with p as (
			select * from unnest(
				${pgArray(groups.map((g) => g.familyId))}::uuid[], ${pgArray(groups.map((g) => g.key))}::int2[],
				${arr(groups.map((g) => g.low))}::float8[], ${arr(groups.map((g) => g.high))}::float8[],
				${arr(groups.map((g) => g.median))}::float8[], ${arr(groups.map((g) => g.mad))}::float8[]
			) as p(family_id, series_key, low, high, median, mad)
		), lv as (${LIMIT_VERSIONS}),
		x as (
			select r.id, r.family_id, r.series_key, r.head_id, r.cylinder, r.side, r.valve, r.value, r.measured_at, r.measured_by,
				lv.min as limit_min, lv.max as limit_max, lv.effective_from as limit_from, p.low, p.high,
				case when p.mad > 0 then ${opts.factor}::float8 * (r.value - p.median) / p.mad end as z
			from readings r
			join p on p.family_id = r.family_id and p.series_key = r.series_key
			left join lv on lv.family_id = r.family_id and lapmark_series(lv.measurement, lv.stage, lv.side) = r.series_key
				and lv.effective_from <= (r.measured_at at time zone 'UTC')::date
				and (lv.effective_to is null or lv.effective_to > (r.measured_at at time zone 'UTC')::date)
			where ${readingsWhere(shopId, sel)}
		)
		select x.id::float8 as id, x.family_id as "familyId", x.series_key as key, x.head_id as "headId", h.serial,
			x.cylinder, x.side, x.valve, x.value, x.measured_at as "measuredAt", x.measured_by as "measuredBy",
			x.limit_min as "limitMin", x.limit_max as "limitMax", x.limit_from::text as "limitFrom", x.z,
			count(*) over ()::int as total
		from x join heads h on h.id = x.head_id
		where x.value < x.limit_min or x.value > x.limit_max or x.value < x.low or x.value > x.high
			or abs(x.z) > ${opts.zLimit}::float8
		order by ${order}
		limit ${opts.limit} offset ${opts.offset}`);
}

/** How many readings of the selection an outlier page would list (for an empty page). */
export async function outlierCount(conn: Conn, shopId: string, sel: Selection, groups: readonly OutlierParams[], opts: { factor: number; zLimit: number }): Promise<number> {
	const rows = await outlierPage(conn, shopId, sel, groups, { ...opts, sort: 'value', limit: 1, offset: 0 });
	return rows[0]?.total ?? 0;
}

// ---------------------------------------------------------------------------------------------
// Rates

export type PositionTally = {
	familyId: string;
	side: Side;
	cylinder: number;
	/** Valve positions judged. */
	n: number;
	failures: number;
};

/**
 * Valve positions (head × cylinder × side × valve) with readings of the selection that had limits
 * on their day, and how many had any reading outside those limits, per family × side × cylinder.
 */
export async function measurementTallies(conn: Conn, shopId: string, sel: Selection): Promise<PositionTally[]> {
	// Each family × series' limit versions as three arrays in effective order, so a reading meets
	// the version in force on its day (UTC) by width_bucket over the versions' first instants, on
	// a plain equality join: the planner then estimates the rows rightly and hashes both
	// groupings, where a join on date ranges sorted every reading twice (about twice as slow).
	// Bucket 0: before the first version, no limits to judge by.
	return conn.execute<PositionTally>(sql`
		with lv as (
			select family_id, lapmark_series(measurement, stage, side) as series_key,
				array_agg((effective_from::timestamp at time zone 'UTC') order by effective_from) as starts,
				array_agg(coalesce(min, '-Infinity') order by effective_from) as mins,
				array_agg(coalesce(max, 'Infinity') order by effective_from) as maxs
			from limits where shop_id = ${shopId}
			group by 1, 2
		),
		judged as (
			-- Only columns of readings_series_idx, so the scan is index-only (side is in series_key).
			select r.head_id, r.family_id, r.series_key, r.cylinder, r.valve, r.value, lv.mins, lv.maxs,
				width_bucket(r.measured_at, lv.starts) as version
			from readings r
			join lv on lv.family_id = r.family_id and lv.series_key = r.series_key
			where ${readingsWhere(shopId, sel)}
		),
		pos as (
			select family_id, series_key, cylinder, bool_or(value < mins[version] or value > maxs[version]) as failed
			from judged where version > 0
			group by head_id, family_id, series_key, cylinder, valve
		)
		select family_id as "familyId", case when series_key % 2 = 1 then 'exhaust' else 'intake' end as side,
			cylinder::int as cylinder, count(*)::int as n, count(*) filter (where failed)::int as failures
		from pos group by 1, 2, 3 order by 1, 2, 3`);
}

export interface DecisionSelection {
	familyIds: string[] | null;
	side: Side | null;
	from: string | null;
	to: string | null;
	customer: string | null;
	mileageMin: number | null;
	mileageMax: number | null;
}

/** Valve positions with a decision, and how many got `kind`, per family × side × cylinder. */
export async function decisionTallies(conn: Conn, shopId: string, sel: DecisionSelection, kind: string): Promise<PositionTally[]> {
	const where: SQL[] = [sql`d.shop_id = ${shopId}`];
	if (sel.familyIds) where.push(sql`h.family_id = any(${pgArray(sel.familyIds)}::uuid[])`);
	if (sel.side) where.push(sql`d.side = ${sel.side}::side`);
	if (sel.from) where.push(sql`d.decided_at >= ${stamp(sel.from)}::timestamptz`);
	if (sel.to) where.push(sql`d.decided_at < ${stamp(addDays(sel.to, 1))}::timestamptz`);
	if (sel.customer) where.push(sql`lower(h.customer) = lower(${sel.customer})`);
	if (sel.mileageMin !== null) where.push(sql`h.mileage_km >= ${sel.mileageMin}`);
	if (sel.mileageMax !== null) where.push(sql`h.mileage_km <= ${sel.mileageMax}`);
	return conn.execute<PositionTally>(sql`
		select h.family_id as "familyId", d.side, d.cylinder::int as cylinder, count(*)::int as n,
			count(*) filter (where d.kind = ${kind}::decision_kind)::int as failures
		from decisions d join heads h on h.id = d.head_id
		where ${sql.join(where, sql` and `)}
		group by 1, 2, 3 order by 1, 2, 3`);
}

export type ComebackTally = {
	familyId: string;
	released: number;
	cameBack: number;
};

/** Released heads per family, and how many of them came back (a later job names them). */
export async function comebackTallies(conn: Conn, shopId: string, sel: Omit<DecisionSelection, 'side'>): Promise<ComebackTally[]> {
	const where: SQL[] = [sql`h.shop_id = ${shopId}`, sql`h.released_on is not null`];
	if (sel.familyIds) where.push(sql`h.family_id = any(${pgArray(sel.familyIds)}::uuid[])`);
	if (sel.from) where.push(sql`h.released_on >= ${sel.from}::date`);
	if (sel.to) where.push(sql`h.released_on <= ${sel.to}::date`);
	if (sel.customer) where.push(sql`lower(h.customer) = lower(${sel.customer})`);
	if (sel.mileageMin !== null) where.push(sql`h.mileage_km >= ${sel.mileageMin}`);
	if (sel.mileageMax !== null) where.push(sql`h.mileage_km <= ${sel.mileageMax}`);
	return conn.execute<ComebackTally>(sql`
		select h.family_id as "familyId", count(*)::int as released,
			count(*) filter (where exists (select 1 from heads c where c.shop_id = h.shop_id and c.comeback_of = h.id))::int as "cameBack"
		from heads h
		where ${sql.join(where, sql` and `)}
		group by 1 order by 1`);
}

// ---------------------------------------------------------------------------------------------
// Series in time order (capability, control charts) and against mileage (wear)

export type TimedReading = {
	id: number;
	value: number;
	measuredAt: Date;
	serial: string;
	measuredBy: string;
	total: number;
};

/** Readings of the selection in time order; with `last`, only the most recent `last`. */
export async function readingsInTimeOrder(conn: Conn, shopId: string, sel: Selection, last?: number): Promise<TimedReading[]> {
	const rows = await conn.execute<TimedReading>(sql`
		select r.id::float8 as id, r.value, r.measured_at as "measuredAt", h.serial, r.measured_by as "measuredBy",
			count(*) over ()::int as total
		from readings r join heads h on h.id = r.head_id
		where ${readingsWhere(shopId, sel)}
		order by r.measured_at desc, r.id desc
		${last ? sql`limit ${last}` : sql``}`);
	return rows.reverse();
}

export type MileagePoint = {
	id: number;
	mileageKm: number;
	value: number;
};

/** Readings of the selection on heads with a known mileage, in reading id order. */
export async function readingsWithMileage(conn: Conn, shopId: string, sel: Selection): Promise<MileagePoint[]> {
	return conn.execute<MileagePoint>(sql`
		select r.id::float8 as id, h.mileage_km as "mileageKm", r.value
		from readings r join heads h on h.id = r.head_id
		where ${readingsWhere(shopId, sel)} and h.mileage_km is not null
		order by r.id`);
}
