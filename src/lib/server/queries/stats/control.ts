// Control charts' SQL: a family × series' stored baseline, the readings a baseline is computed
// from, and the monthly tallies of valve positions outside the limits of their day (p-chart).
import { and, eq, sql } from 'drizzle-orm';
import type { Measurement, Side, Stage } from '../../../measurements';
import type { Conn } from '../../db/scope';
import { controlBaselines, type ControlBaseline } from '../../db/schema';
import { readingsWhere, type Selection } from './selection';
import { addDays, stamp } from './window';

export interface SeriesOfFamily {
	familyId: string;
	measurement: Measurement;
	stage: Stage;
	side: Side;
}

const whereSeries = (shopId: string, s: SeriesOfFamily) =>
	and(
		eq(controlBaselines.shopId, shopId),
		eq(controlBaselines.familyId, s.familyId),
		eq(controlBaselines.measurement, s.measurement),
		eq(controlBaselines.stage, s.stage),
		eq(controlBaselines.side, s.side)
	);

/** The stored baseline of a family × series, or null. */
export async function storedBaseline(conn: Conn, shopId: string, s: SeriesOfFamily): Promise<ControlBaseline | null> {
	const [row] = await conn.select().from(controlBaselines).where(whereSeries(shopId, s)).limit(1);
	return row ?? null;
}

export type BaselineInput = SeriesOfFamily & {
	fromDay: string;
	toDay: string;
	n: number;
	centre: number;
	mrBar: number;
	setBy: string | null;
	setByLabel: string;
};

/** Stores (or replaces) a family × series' baseline. */
export async function saveBaseline(conn: Conn, shopId: string, b: BaselineInput): Promise<ControlBaseline> {
	const values = { shopId, ...b, setAt: new Date() };
	const [row] = await conn
		.insert(controlBaselines)
		.values(values)
		.onConflictDoUpdate({
			target: [controlBaselines.shopId, controlBaselines.familyId, controlBaselines.measurement, controlBaselines.stage, controlBaselines.side],
			set: { fromDay: b.fromDay, toDay: b.toDay, n: b.n, centre: b.centre, mrBar: b.mrBar, setBy: b.setBy, setByLabel: b.setByLabel, setAt: values.setAt }
		})
		.returning();
	return row;
}

export type BaselineReading = { value: number; measuredAt: Date };

/**
 * A family × series' readings in time order: between two days (inclusive, UTC) or, without them,
 * the earliest `first`. Only columns of readings_series_idx, so the scan is index-only.
 */
export async function baselineReadings(
	conn: Conn,
	shopId: string,
	familyId: string,
	key: number,
	span: { from: string; to: string } | { first: number }
): Promise<BaselineReading[]> {
	const dates =
		'from' in span ? sql`and r.measured_at >= ${stamp(span.from)}::timestamptz and r.measured_at < ${stamp(addDays(span.to, 1))}::timestamptz` : sql``;
	return conn.execute<BaselineReading>(sql`
		select r.value, r.measured_at as "measuredAt"
		from readings r
		where r.shop_id = ${shopId} and r.series_key = ${key}::int2 and r.family_id = ${familyId}::uuid ${dates}
		order by r.measured_at, r.id
		${'first' in span ? sql`limit ${span.first}` : sql``}`);
}

export type MonthlyTally = {
	familyId: string;
	/** YYYY-MM (UTC). */
	month: string;
	/** Valve positions judged in the month. */
	n: number;
	failures: number;
};

/**
 * Valve positions (head × series × cylinder × valve) with readings of the selection that had
 * limits on their day, and how many had any reading outside those limits, per family × month of
 * the position's first reading. The same judgement as measurementTallies (queries/stats/rates.ts):
 * each reading meets the limit version in force on its day (UTC).
 */
export async function monthlyPositionTallies(conn: Conn, shopId: string, sel: Selection): Promise<MonthlyTally[]> {
	return conn.execute<MonthlyTally>(sql`
		with lv as (
			select family_id, lapmark_series(measurement, stage, side) as series_key,
				array_agg((effective_from::timestamp at time zone 'UTC') order by effective_from) as starts,
				array_agg(coalesce(min, '-Infinity') order by effective_from) as mins,
				array_agg(coalesce(max, 'Infinity') order by effective_from) as maxs
			from limits where shop_id = ${shopId}
			group by 1, 2
		),
		judged as (
			select r.head_id, r.family_id, r.series_key, r.cylinder, r.valve, r.value, r.measured_at, lv.mins, lv.maxs,
				width_bucket(r.measured_at, lv.starts) as version
			from readings r
			join lv on lv.family_id = r.family_id and lv.series_key = r.series_key
			where ${readingsWhere(shopId, sel)}
		),
		pos as (
			select family_id, lapmark_month(min(measured_at)) as month, bool_or(value < mins[version] or value > maxs[version]) as failed
			from judged where version > 0
			group by head_id, family_id, series_key, cylinder, valve
		)
		select family_id as "familyId", to_char(month, 'YYYY-MM') as month, count(*)::int as n,
			count(*) filter (where failed)::int as failures
		from pos group by family_id, month order by 1, 2`);
}
