// First-pass yield: heads whose final check passed without a second round, per family and the
// machinist who took the final check.
import { sql, type SQL } from 'drizzle-orm';
import type { Conn } from '../../db/scope';
import type { Selection } from './selection';
import { addDays, stamp } from './window';

export type FirstPassTally = {
	familyId: string;
	/** readings.measured_by of the head's first final reading. */
	machinist: string;
	/** Heads with a final check. */
	heads: number;
	/** Of them, heads whose every first final reading was within the limits of its day and none read again. */
	passed: number;
};

/**
 * Per family × machinist: heads with final readings, and those that passed first time. A
 * position × measurement read again later at the final stage (a retest) is a second round; a
 * first reading outside the limits of its day fails the first pass (a reading without limits
 * on its day passes). The first final reading of a head names its machinist and its day: the
 * selection's `from`, `to` and `machinist` apply to that reading, `keys` are the final stage's.
 */
export async function firstPassTallies(conn: Conn, shopId: string, sel: Selection): Promise<FirstPassTally[]> {
	const where: SQL[] = [sql`r.shop_id = ${shopId}`, sql`r.series_key = any(${sql.param(sel.keys)}::int2[])`];
	if (sel.familyIds) where.push(sql`r.family_id = any(${sql.param(sel.familyIds)}::uuid[])`);
	const head: SQL[] = [];
	if (sel.customer) head.push(sql`lower(h.customer) = lower(${sel.customer})`);
	if (sel.mileageMin !== null) head.push(sql`h.mileage_km >= ${sel.mileageMin}`);
	if (sel.mileageMax !== null) head.push(sql`h.mileage_km <= ${sel.mileageMax}`);
	if (head.length) where.push(sql`r.head_id in (select h.id from heads h where h.shop_id = ${shopId} and ${sql.join(head, sql` and `)})`);
	const after: SQL[] = [sql`true`];
	if (sel.from) after.push(sql`first_at >= ${stamp(sel.from)}::timestamptz`);
	if (sel.to) after.push(sql`first_at < ${stamp(addDays(sel.to, 1))}::timestamptz`);
	if (sel.machinist) after.push(sql`lower(machinist) = lower(${sel.machinist})`);
	// Limit versions as arrays in effective order, met by width_bucket (as measurementTallies).
	return conn.execute<FirstPassTally>(sql`
		with lv as (
			select family_id, lapmark_series(measurement, stage, side) as series_key,
				array_agg((effective_from::timestamp at time zone 'UTC') order by effective_from) as starts,
				array_agg(coalesce(min, '-Infinity') order by effective_from) as mins,
				array_agg(coalesce(max, 'Infinity') order by effective_from) as maxs
			from limits where shop_id = ${shopId}
			group by 1, 2
		),
		fin as (
			select r.head_id, r.family_id, r.measured_at, r.measured_by, r.value, lv.mins, lv.maxs,
				row_number() over (partition by r.head_id, r.series_key, r.cylinder, r.valve order by r.measured_at, r.id) as round,
				coalesce(width_bucket(r.measured_at, lv.starts), 0) as version
			from readings r
			left join lv on lv.family_id = r.family_id and lv.series_key = r.series_key
			where ${sql.join(where, sql` and `)}
		),
		per_head as (
			select head_id, family_id, min(measured_at) as first_at,
				(array_agg(measured_by order by measured_at, measured_by))[1] as machinist,
				bool_or(round > 1) as again,
				bool_or(round = 1 and version > 0 and (value < mins[version] or value > maxs[version])) as failed
			from fin group by head_id, family_id
		)
		select family_id as "familyId", machinist, count(*)::int as heads,
			count(*) filter (where not again and not failed)::int as passed
		from per_head
		where ${sql.join(after, sql` and `)}
		group by 1, 2 order by 1, 2`);
}
