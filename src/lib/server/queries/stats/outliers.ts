// Readings outside the limits of their day, outside their group's Tukey fences or with a large
// modified z-score, one page at a time (rates, capability and the rest read readings too).
import { sql, type SQL } from 'drizzle-orm';
import type { Side } from '../../../measurements';
import type { Conn } from '../../db/scope';
import { LIMIT_VERSIONS } from '../overview';
import { readingsWhere, type Selection } from './selection';

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
	const order = OUTLIER_ORDER[opts.sort] ?? OUTLIER_ORDER['-measuredAt'];
	return conn.execute<OutlierRow>(sql`
		with p as (
			select * from unnest(
				${sql.param(groups.map((g) => g.familyId))}::uuid[], ${sql.param(groups.map((g) => g.key))}::int2[],
				${sql.param(groups.map((g) => g.low))}::float8[], ${sql.param(groups.map((g) => g.high))}::float8[],
				${sql.param(groups.map((g) => g.median))}::float8[], ${sql.param(groups.map((g) => g.mad))}::float8[]
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
