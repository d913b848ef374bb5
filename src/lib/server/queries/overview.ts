import { sql } from 'drizzle-orm';
import { MEASUREMENTS } from '../../measurements';
import type { OverviewResponse } from '../../contract';
import type { Conn } from '../db/scope';
import { seriesKey } from '../db/series';

/** Limits with the day each version stops applying, so a reading finds the version of its day. */
export const LIMIT_VERSIONS = sql`
	select l.*, lead(l.effective_from) over (
		partition by l.family_id, l.measurement, l.side, l.stage order by l.effective_from
	) as effective_to
	from limits l`;

/** The overview's answer: the contract's shape (GET /api/v1/overview). */
export type OverviewFigures = OverviewResponse;

/** Every as-received series key: the index readings_series_idx narrows on these under RLS. */
const AS_RECEIVED_KEYS = MEASUREMENTS.flatMap((m) => [seriesKey(m, 'as_received', 'intake'), seriesKey(m, 'as_received', 'exhaust')]);

/** Heads received and released this month, and in work now. */
export async function headCounts(conn: Conn, shopId: string) {
	const [heads] = await conn.execute<{ received: number; released: number; in_work: number }>(sql`
		select
			count(*) filter (where received_on >= date_trunc('month', current_date))::int as received,
			count(*) filter (where released_on >= date_trunc('month', current_date))::int as released,
			count(*) filter (where status <> 'released')::int as in_work
		from heads where shop_id = ${shopId}`);
	return heads;
}

/** Readings stored: the per-month summaries hold the count of every series, kept current by triggers. */
export async function readingsStored(conn: Conn, shopId: string): Promise<number> {
	const [stored] = await conn.execute<{ n: number }>(sql`select coalesce(sum(n), 0)::int as n from reading_summaries where shop_id = ${shopId}`);
	return stored.n;
}

/** The latest comebacks: the new job, the original job, what failed (when recorded). */
export async function latestComebacks(conn: Conn, shopId: string, limit = 5) {
	const rows = await conn.execute<OverviewFigures['latestComebacks'][number]>(sql`
		select h.id as "headId", h.serial, f.code as family, h.received_on::text as "receivedOn", h.comeback_of as "originalHeadId",
			coalesce(c.what_failed, '') as reason
		from heads h
		join families f on f.shop_id = h.shop_id and f.id = h.family_id
		left join comebacks c on c.shop_id = h.shop_id and c.head_id = h.id
		where h.shop_id = ${shopId} and h.comeback_of is not null
		order by h.received_on desc, h.serial limit ${limit}`);
	return [...rows];
}

export type FailingRow = { side: 'intake' | 'exhaust'; positions: number; failing: number };

/** Valve positions with any as-received reading outside the limits of its day, per side. */
/** A fingerprint of everything failingPositions depends on: the readings (their per-month
 * summaries change with every insert, update or delete: count, mean and M2) and the limits. Two
 * small aggregates, where the answer itself reads every as-received reading of the shop. */
export async function failingFingerprint(conn: Conn, shopId: string): Promise<string> {
	const [fp] = await conn.execute<{ fingerprint: string }>(sql`
		select concat_ws(':',
			(select concat_ws(',', count(*), sum(n), sum(mean * n), sum(m2)) from reading_summaries where shop_id = ${shopId}),
			(select concat_ws(',', count(*), sum(coalesce(min, 0)), sum(coalesce(max, 0)), max(effective_from)) from limits where shop_id = ${shopId})
		) as fingerprint`);
	return fp.fingerprint;
}

export async function failingPositions(conn: Conn, shopId: string): Promise<FailingRow[]> {
	// Filtering on series_key lets this read the covering index alone (no table rows).
	const rows = await conn.execute<FailingRow>(sql`
		with lv as (
			select l.family_id, lapmark_series(l.measurement, l.stage, l.side) as series_key, l.min, l.max, l.effective_from,
				lead(l.effective_from) over (partition by l.family_id, l.measurement, l.side, l.stage order by l.effective_from) as effective_to
			from limits l where l.shop_id = ${shopId} and l.stage = 'as_received'
		),
		judged as (
			select r.head_id, r.cylinder, r.series_key & 1 as exhaust, r.valve,
				bool_or(r.value < coalesce(lv.min, '-Infinity') or r.value > coalesce(lv.max, 'Infinity')) as out
			from readings r
			-- A reading measured before its family × series had any limits is not judged, and its
			-- position not counted: the same positions as the rates answer (stats/rates).
			join lv on lv.family_id = r.family_id and lv.series_key = r.series_key
				and lv.effective_from <= r.measured_at::date and (lv.effective_to is null or lv.effective_to > r.measured_at::date)
			where r.shop_id = ${shopId} and r.series_key = any(${sql.param(AS_RECEIVED_KEYS)}::smallint[])
			group by 1, 2, 3, 4
		)
		select case exhaust when 1 then 'exhaust' else 'intake' end as side, count(*)::int as positions,
			count(*) filter (where out)::int as failing
		from judged group by exhaust order by exhaust`);
	return [...rows];
}

