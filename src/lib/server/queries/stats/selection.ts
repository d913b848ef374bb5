// What a statistics request looks at: the shop's families, the limits in force, and the
// selection as SQL conditions on readings.
//
// Every query filters readings on series_key rather than on measurement/stage/side: row-level
// security lets an index use only leakproof comparisons, and enum equality is not leakproof.
// Arrays (family ids, series keys) are bound as one array parameter each.
import { sql, type SQL } from 'drizzle-orm';
import type { Conn } from '../../db/scope';
import { addDays, stamp, type DayRange } from './window';

// ---------------------------------------------------------------------------------------------
// Families and limits

export type FamilyRef = {
	id: string;
	code: string;
	cylinders: number;
};

export async function shopFamilies(conn: Conn, shopId: string): Promise<FamilyRef[]> {
	return conn.execute<FamilyRef>(sql`
		select id, code, cylinders from families where shop_id = ${shopId} order by code`);
}

export type LimitRow = {
	familyId: string;
	key: number;
	min: number | null;
	max: number | null;
	effectiveFrom: string;
};

/** The limit versions in force on `day`, one per family × series (optionally only some). */
export async function limitsOn(conn: Conn, shopId: string, day: string, only?: { familyIds?: string[] | null; keys?: number[] }): Promise<LimitRow[]> {
	const where: SQL[] = [sql`shop_id = ${shopId}`, sql`effective_from <= ${day}::date`];
	if (only?.familyIds) where.push(sql`family_id = any(${sql.param(only.familyIds)}::uuid[])`);
	if (only?.keys) where.push(sql`lapmark_series(measurement, stage, side) = any(${sql.param(only.keys)}::int2[])`);
	return conn.execute<LimitRow>(sql`
		select distinct on (family_id, measurement, side, stage)
			family_id as "familyId", lapmark_series(measurement, stage, side) as key, min, max,
			effective_from::text as "effectiveFrom"
		from limits
		where ${sql.join(where, sql` and `)}
		order by family_id, measurement, side, stage, effective_from desc`);
}

// ---------------------------------------------------------------------------------------------
// Selections

/** What a statistics request looks at; every field narrows it. */
export interface Selection {
	/** null: every family of the shop. */
	familyIds: string[] | null;
	/** Series keys (measurement × stage × side); never empty. */
	keys: number[];
	/** Inclusive UTC days of measured_at. */
	from: string | null;
	to: string | null;
	machinist: string | null;
	customer: string | null;
	mileageMin: number | null;
	mileageMax: number | null;
}


/** Does the selection need readings whatever the dates (a filter the summaries do not keep)? */
export function needsReadings(sel: Selection): boolean {
	return sel.machinist !== null || sel.customer !== null || sel.mileageMin !== null || sel.mileageMax !== null;
}

/** Filters on readings `r` (and its head), for the selection, optionally within `ranges`. */
export function readingsWhere(shopId: string, sel: Selection, ranges?: readonly DayRange[]): SQL {
	// One series (one family) as a plain equality, not `= any` of a one-element array: then
	// readings_series_idx gives the readings in time order, and the latest n are read backwards
	// off it without sorting the whole selection (the control chart).
	const parts: SQL[] = [
		sql`r.shop_id = ${shopId}`,
		sel.keys.length === 1 ? sql`r.series_key = ${sel.keys[0]}::int2` : sql`r.series_key = any(${sql.param(sel.keys)}::int2[])`
	];
	if (sel.familyIds) {
		parts.push(sel.familyIds.length === 1 ? sql`r.family_id = ${sel.familyIds[0]}::uuid` : sql`r.family_id = any(${sql.param(sel.familyIds)}::uuid[])`);
	}
	if (sel.from) parts.push(sql`r.measured_at >= ${stamp(sel.from)}::timestamptz`);
	if (sel.to) parts.push(sql`r.measured_at < ${stamp(addDays(sel.to, 1))}::timestamptz`);
	if (ranges) {
		const alternatives = ranges.map((g) => {
			const c: SQL[] = [];
			if (g.start) c.push(sql`r.measured_at >= ${stamp(g.start)}::timestamptz`);
			if (g.end) c.push(sql`r.measured_at < ${stamp(g.end)}::timestamptz`);
			return c.length ? sql`(${sql.join(c, sql` and `)})` : sql`true`;
		});
		parts.push(alternatives.length ? sql`(${sql.join(alternatives, sql` or `)})` : sql`false`);
	}
	if (sel.machinist) parts.push(sql`lower(r.measured_by) = lower(${sel.machinist})`);
	const head: SQL[] = [];
	if (sel.customer) head.push(sql`lower(h.customer) = lower(${sel.customer})`);
	if (sel.mileageMin !== null) head.push(sql`h.mileage_km >= ${sel.mileageMin}`);
	if (sel.mileageMax !== null) head.push(sql`h.mileage_km <= ${sel.mileageMax}`);
	if (head.length) {
		parts.push(sql`r.head_id in (select h.id from heads h where h.shop_id = ${shopId} and ${sql.join(head, sql` and `)})`);
	}
	return sql.join(parts, sql` and `);
}
