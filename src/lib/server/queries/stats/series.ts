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
