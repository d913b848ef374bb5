// Series in time order (capability, control charts) and against mileage (wear).
import { sql } from 'drizzle-orm';
import type { Conn } from '../../db/scope';
import { readingsWhere, type Selection } from './selection';

export type TimedReading = {
	id: number;
	value: number;
	measuredAt: Date;
	serial: string;
	measuredBy: string;
	total: number;
};

/**
 * Readings of the selection in time order; with `last`, only the most recent `last`, and `total`
 * counts the whole selection. The latest `last` come off readings_series_idx alone and only they
 * are joined to their heads; the total is a count of its own (an index-only scan), not a window
 * over every reading of the selection joined to its head, which cost the control chart most of its
 * time at a million readings.
 */
export async function readingsInTimeOrder(conn: Conn, shopId: string, sel: Selection, last?: number): Promise<TimedReading[]> {
	if (!last) {
		const rows = await conn.execute<Omit<TimedReading, 'total'>>(sql`
			select r.id::float8 as id, r.value, r.measured_at as "measuredAt", h.serial, r.measured_by as "measuredBy"
			from readings r join heads h on h.id = r.head_id
			where ${readingsWhere(shopId, sel)}
			order by r.measured_at, r.id`);
		return rows.map((r) => ({ ...r, total: rows.length }));
	}
	return conn.execute<TimedReading>(sql`
		with w as (
			select r.id, r.value, r.measured_at, r.head_id, r.measured_by
			from readings r
			where ${readingsWhere(shopId, sel)}
			order by r.measured_at desc, r.id desc
			limit ${last})
		select w.id::float8 as id, w.value, w.measured_at as "measuredAt", h.serial, w.measured_by as "measuredBy",
			(select count(*) from readings r where ${readingsWhere(shopId, sel)})::int as total
		from w join heads h on h.id = w.head_id
		order by w.measured_at, w.id`);
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
