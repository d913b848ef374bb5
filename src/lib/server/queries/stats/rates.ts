// Failure and comeback tallies: valve positions judged against the limits of their day, decided
// positions, released heads that came back.
//
// Measurement tallies read reading_position_tallies (schema/rates.ts, kept by the triggers of
// drizzle/0013) for selections the summaries answer: no filter they do not keep (machinist,
// customer, mileage) and a date range of whole calendar months (UTC) or none. Otherwise they read
// readings, the whole range: a position seen both in a partial month and in a whole one must count
// once, which a sum of the two parts cannot know.
import { sql, type SQL } from 'drizzle-orm';
import type { Side } from '../../../measurements';
import type { Conn } from '../../db/scope';
import { needsReadings, readingsWhere, type Selection } from './selection';
import { addDays, splitWindow, stamp, type DayRange } from './window';

export type PositionTally = {
	familyId: string;
	side: Side;
	cylinder: number;
	/** Valve positions judged. */
	n: number;
	failures: number;
};

/**
 * Valve positions judged in the selection's readings, one row per position (× month with
 * `byMonth`), with `failed`: any of those readings outside the limits of its day.
 */
function judgedPositions(shopId: string, sel: Selection, opts: { ranges?: readonly DayRange[]; byMonth?: boolean } = {}): SQL {
	// Each family × series' limit versions as three arrays in effective order, so a reading meets
	// the version in force on its day (UTC) by width_bucket over the versions' first instants, on
	// a plain equality join: the planner then estimates the rows rightly and hashes both
	// groupings, where a join on date ranges sorted every reading twice (about twice as slow).
	// Bucket 0: before the first version, no limits to judge by. The triggers of drizzle/0013
	// judge the same way.
	return sql`
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
				${opts.byMonth ? sql`lapmark_month(r.measured_at)` : sql`null::date`} as month,
				width_bucket(r.measured_at, lv.starts) as version
			from readings r
			join lv on lv.family_id = r.family_id and lv.series_key = r.series_key
			where ${readingsWhere(shopId, sel, opts.ranges)}
		),
		pos as (
			select family_id, series_key, cylinder, month, bool_or(value < mins[version] or value > maxs[version]) as failed
			from judged where version > 0
			group by head_id, family_id, series_key, cylinder, valve, month
		)`;
}

/** The summaries' rows of the selection's whole months `[start, end)` (null: unbounded). */
function talliesWhere(shopId: string, sel: Selection, months: DayRange): SQL {
	const where: SQL[] = [sql`shop_id = ${shopId}`, sql`series_key = any(${sql.param(sel.keys)}::int2[])`];
	if (sel.familyIds) where.push(sql`family_id = any(${sql.param(sel.familyIds)}::uuid[])`);
	if (months.start) where.push(sql`month >= ${months.start}::date`);
	if (months.end) where.push(sql`month < ${months.end}::date`);
	return sql.join(where, sql` and `);
}

/** The whole months the summaries answer for the selection, or null when readings must be read. */
function summaryMonths(sel: Selection): DayRange | null {
	if (needsReadings(sel)) return null;
	const win = splitWindow(sel.from, sel.to);
	return win.edges.length || !win.months ? null : win.months;
}

/** Where measurementTallies reads a selection from. */
export function talliesSource(sel: Selection): 'summaries' | 'readings' {
	return summaryMonths(sel) ? 'summaries' : 'readings';
}

/**
 * Valve positions (head × cylinder × side × valve) with readings of the selection that had limits
 * on their day, and how many had any reading outside those limits, per family × side × cylinder.
 * `source: 'readings'` ignores the summaries (the tests compare both ways).
 */
export async function measurementTallies(conn: Conn, shopId: string, sel: Selection, opts: { source?: 'auto' | 'readings' } = {}): Promise<PositionTally[]> {
	const months = opts.source === 'readings' ? null : summaryMonths(sel);
	if (months) {
		// Each position's first judged (failing) month in the range is the one entry whose previous
		// such month lies before the range: one per position, however many months it spans.
		const first = months.start ? sql`prev_month < ${months.start}::date` : sql`prev_month = '-infinity'::date`;
		return conn.execute<PositionTally>(sql`
			select family_id as "familyId", case when series_key % 2 = 1 then 'exhaust' else 'intake' end as side,
				cylinder::int as cylinder, sum(checked)::int as n, sum(failed)::int as failures
			from reading_position_tallies
			where ${talliesWhere(shopId, sel, months)} and ${first}
			group by 1, 2, 3 having sum(checked) > 0 order by 1, 2, 3`);
	}
	return conn.execute<PositionTally>(sql`
		${judgedPositions(shopId, sel)}
		select family_id as "familyId", case when series_key % 2 = 1 then 'exhaust' else 'intake' end as side,
			cylinder::int as cylinder, count(*)::int as n, count(*) filter (where failed)::int as failures
		from pos group by 1, 2, 3 order by 1, 2, 3`);
}

export type MonthlyPositionTally = {
	familyId: string;
	/** First day of the calendar month (UTC), YYYY-MM-01. */
	month: string;
	/** Valve positions judged by readings of that month. */
	n: number;
	/** Of them, positions with a reading of that month outside the limits of its day. */
	failures: number;
};

/**
 * Valve positions judged and failing per family × calendar month (UTC), for a p-chart: a position
 * counts in every month it has a judged reading in. Whole months come from the summaries; the
 * partial months at either end of a date range, and selections with a filter the summaries do not
 * keep, from readings (months are disjoint, so the parts add up exactly).
 */
export async function monthlyPositionTallies(
	conn: Conn,
	shopId: string,
	sel: Selection,
	opts: { source?: 'auto' | 'readings' } = {}
): Promise<MonthlyPositionTally[]> {
	const fromReadings = (ranges?: DayRange[]) =>
		conn.execute<MonthlyPositionTally>(sql`
			${judgedPositions(shopId, sel, { ranges, byMonth: true })}
			select family_id as "familyId", month::text as month, count(*)::int as n, count(*) filter (where failed)::int as failures
			from pos group by 1, 2`);
	let rows: MonthlyPositionTally[];
	if (opts.source === 'readings' || needsReadings(sel)) {
		rows = await fromReadings();
	} else {
		const win = splitWindow(sel.from, sel.to);
		const [whole, edges] = await Promise.all([
			win.months
				? conn.execute<MonthlyPositionTally>(sql`
						select family_id as "familyId", month::text as month, sum(checked)::int as n, sum(failed)::int as failures
						from reading_position_tallies where ${talliesWhere(shopId, sel, win.months)}
						group by 1, 2 having sum(checked) > 0`)
				: ([] as MonthlyPositionTally[]),
			win.edges.length ? fromReadings(win.edges) : ([] as MonthlyPositionTally[])
		]);
		rows = [...whole, ...edges];
	}
	return [...rows].sort((a, b) => (a.familyId < b.familyId ? -1 : a.familyId > b.familyId ? 1 : a.month < b.month ? -1 : a.month > b.month ? 1 : 0));
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
	if (sel.familyIds) where.push(sql`h.family_id = any(${sql.param(sel.familyIds)}::uuid[])`);
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
	if (sel.familyIds) where.push(sql`h.family_id = any(${sql.param(sel.familyIds)}::uuid[])`);
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
