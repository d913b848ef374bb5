// The readings themselves, filtered like the statistics (readingsWhere): one page for a table,
// or the SQL of a whole export that the route streams through a cursor.
import { sql, type SQL } from 'drizzle-orm';
import { PgDialect } from 'drizzle-orm/pg-core';
import type { ReadingItem } from '../../contract';
import { MEASUREMENTS, MEASUREMENT_INFO, type Measurement, type Side, type Stage } from '../../measurements';
import type { ReadingSort } from '../../schemas/readings';
import type { Conn } from '../db/scope';
import { seriesKeys } from '../db/series';
import { readingsWhere, type Selection } from './stats';

/** CSV header names, in column order, and the JSON field each comes from (JSON also has id and headId). */
export const CSV_COLUMNS = [
	['head_serial', 'headSerial'],
	['family', 'family'],
	['customer', 'customer'],
	['stage', 'stage'],
	['cylinder', 'cylinder'],
	['side', 'side'],
	['valve', 'valve'],
	['measurement', 'measurement'],
	['value', 'value'],
	['unit', 'unit'],
	['measured_at', 'measuredAt'],
	['measured_by', 'measuredBy'],
	['instrument', 'instrument'],
	['mileage_km', 'mileageKm'],
	['batch', 'batch']
] as const satisfies readonly (readonly [string, keyof ReadingItem])[];

/** Series keys of a measurement (or every measurement) narrowed by stage and side. */
export function readingKeys(measurement: Measurement | undefined, stage?: Stage | null, side?: Side | null): number[] {
	return (measurement ? [measurement] : MEASUREMENTS).flatMap((m) => seriesKeys(m, stage, side)).sort((a, b) => a - b);
}

// The unit is the measurement's canonical unit, written into the SQL so a streamed row needs
// no lookup.
const UNIT_SQL = sql.raw(`case r.measurement ${MEASUREMENTS.map((m) => `when '${m}' then '${MEASUREMENT_INFO[m].unit}'`).join(' ')} end`);

const COLUMNS = sql`r.id::float8 as id, r.head_id as "headId", h.serial as "headSerial", f.code as family, h.customer,
	r.stage, r.cylinder::int as cylinder, r.side, r.valve::int as valve, r.measurement, r.value, ${UNIT_SQL} as unit,
	to_char(r.measured_at at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"') as "measuredAt", r.measured_by as "measuredBy",
	i.serial as instrument, h.mileage_km as "mileageKm", r.batch_id::text as batch`;
const FROM = sql`from readings r
	join heads h on h.id = r.head_id
	join families f on f.id = r.family_id
	left join instruments i on i.id = r.instrument_id`;

// Columns of each sort key (fixed names, never user text); the reading id breaks ties.
const ORDER: Record<string, string[]> = {
	measuredAt: ['r.measured_at'],
	serial: ['h.serial'],
	family: ['f.code'],
	customer: ['h.customer'],
	cylinder: ['r.cylinder', 'r.side', 'r.valve'],
	measurement: ['r.measurement'],
	value: ['r.value'],
	mileage: ['h.mileage_km'],
	measuredBy: ['r.measured_by']
};

function orderBy(sort: ReadingSort): SQL {
	const desc = sort.startsWith('-');
	const dir = desc ? 'desc' : 'asc';
	const cols = ORDER[desc ? sort.slice(1) : sort] ?? ORDER.measuredAt;
	return sql.raw([...cols.map((c) => `${c} ${dir} nulls last`), `r.id ${dir}`].join(', '));
}

/** One page of readings in `sort` order, and how many the filters select. */
export async function readingsPage(conn: Conn, shopId: string, sel: Selection, opts: { sort: ReadingSort; limit: number; offset: number }): Promise<{ rows: ReadingItem[]; total: number }> {
	const where = readingsWhere(shopId, sel);
	const [rows, [{ total }]] = await Promise.all([
		conn.execute<ReadingItem>(sql`select ${COLUMNS} ${FROM} where ${where} order by ${orderBy(opts.sort)} limit ${opts.limit} offset ${opts.offset}`),
		conn.execute<{ total: number }>(sql`select count(*)::float8 as total from readings r where ${where}`)
	]);
	return { rows: [...rows], total };
}

/** The whole export in time order (then reading id), as SQL text and parameters for a cursor. */
export function exportQuery(shopId: string, sel: Selection): { text: string; params: unknown[] } {
	const q = new PgDialect().sqlToQuery(sql`select ${COLUMNS} ${FROM} where ${readingsWhere(shopId, sel)} order by r.measured_at, r.id`);
	return { text: q.sql, params: q.params };
}

/** How many readings the selection holds per series (measurement × stage × side). */
export async function readingCounts(conn: Conn, shopId: string, sel: Selection): Promise<{ key: number; n: number }[]> {
	return conn.execute<{ key: number; n: number }>(sql`
		select r.series_key as key, count(*)::int as n from readings r where ${readingsWhere(shopId, sel)} group by 1 order by 1`);
}
