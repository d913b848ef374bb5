// Failure and comeback tallies: valve positions judged against the limits of their day, decided
// positions, released heads that came back.
import { sql, type SQL } from 'drizzle-orm';
import type { Side } from '../../../measurements';
import type { Conn } from '../../db/scope';
import { readingsWhere, type Selection } from './selection';
import { addDays, stamp } from './window';

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
