// Control charts' SQL: a family × series' stored baseline, the readings a baseline is computed
// from. The p-chart's monthly tallies come from the position tallies (queries/stats/rates.ts).
import { and, eq, sql } from 'drizzle-orm';
import type { Measurement, Side, Stage } from '../../../measurements';
import type { Conn } from '../../db/scope';
import { controlBaselines, type ControlBaseline } from '../../db/schema';
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
