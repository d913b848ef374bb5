// Column builders that many tables share. Each call returns a fresh builder; Drizzle names the
// column from the key it is given (snake_cased), so a table still reads as its own list of
// columns. Only Drizzle is imported here: shops.ts and auth.ts use these too. The columns that
// point at a shop or a person are in refs.ts.
import { sql } from 'drizzle-orm';
import { check, smallint, timestamp, uuid, type AnyPgColumn } from 'drizzle-orm/pg-core';
import { sideEnum } from './enums';

/** A random uuid primary key. */
export function uuidKey() {
	return uuid().primaryKey().defaultRandom();
}

/** A point in time with its zone (timestamptz). */
export function timestampTz() {
	return timestamp({ withTimezone: true });
}

/** When the row was written. */
export function createdAt() {
	return timestampTz().notNull().defaultNow();
}

/** A valve position on a head: cylinder, side and the valve's number on that side. */
export function valvePosition() {
	return {
		cylinder: smallint().notNull(),
		side: sideEnum().notNull(),
		valve: smallint().notNull()
	};
}

/** The ranges of a valve position, named `<table>_cylinder_range` and `<table>_valve_range`. */
export function valvePositionChecks(table: string, t: { cylinder: AnyPgColumn; valve: AnyPgColumn }) {
	return [cylinderCheck(table, t.cylinder), check(`${table}_valve_range`, sql`${t.valve} between 1 and 3`)];
}

/** A cylinder number from 1 to 16, named `<table>_cylinder_range`. */
export function cylinderCheck(table: string, cylinder: AnyPgColumn) {
	return check(`${table}_cylinder_range`, sql`${cylinder} between 1 and 16`);
}

/** Who wrote a value by hand: one to 120 characters once trimmed, named `<table>_measured_by_not_blank`. */
export function measuredByCheck(table: string, measuredBy: AnyPgColumn) {
	return check(`${table}_measured_by_not_blank`, sql`length(trim(${measuredBy})) between 1 and 120`);
}
