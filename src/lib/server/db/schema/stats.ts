import { sql } from 'drizzle-orm';
import { type AnyPgColumn, check, date, doublePrecision, integer, pgTable, primaryKey, smallint, uuid } from 'drizzle-orm/pg-core';

// Per-group summaries of `readings`, kept current by statement-level triggers on readings
// (drizzle/0004_stats_summaries.sql), so the statistics routes never rescan every reading.
// A group is shop × series (measurement × stage × side) × family × calendar month (UTC) of
// measured_at. Keys are leakproof types only (uuid, smallint, date, float8), so that under
// row-level security every key column can narrow an index scan.
//
// These tables hold derived data only: a row exists while readings of its group exist, and the
// triggers delete it when the last one goes. They have no foreign keys on purpose: during a
// cascaded delete (a shop, a head) the triggers rewrite them while the parent rows are already
// gone, which a foreign key would refuse.

/** The key every summary starts with: shop × series × family (a month or a value follows). */
function summaryGroup() {
	return {
		shopId: uuid().notNull(),
		/** measurement × stage × side, as readings.series_key. */
		seriesKey: smallint().notNull(),
		familyId: uuid().notNull()
	};
}

/** The primary key `<table>_pkey`: the group, then the month and/or the value. */
function summaryKey(table: string, t: { shopId: AnyPgColumn; seriesKey: AnyPgColumn; familyId: AnyPgColumn }, ...rest: AnyPgColumn[]) {
	return primaryKey({ name: `${table}_pkey`, columns: [t.shopId, t.seriesKey, t.familyId, ...rest] });
}

/** Count, mean and M2 = Σ(x − mean)² per group-month (Chan, Golub & LeVeque merge on insert). */
export const readingSummaries = pgTable(
	'reading_summaries',
	{
		...summaryGroup(),
		/** First day of the month (UTC) the readings were taken in. */
		month: date().notNull(),
		n: integer().notNull(),
		mean: doublePrecision().notNull(),
		m2: doublePrecision().notNull(),
		min: doublePrecision().notNull(),
		max: doublePrecision().notNull()
	},
	(t) => [
		summaryKey('reading_summaries', t, t.month),
		check('reading_summaries_n_positive', sql`${t.n} > 0`),
		check('reading_summaries_m2_non_negative', sql`${t.m2} >= 0`)
	]
);
export type ReadingSummary = typeof readingSummaries.$inferSelect;

/**
 * Exact frequency table per group-month: how many readings had each value. Readings are
 * quantised at the gauge's resolution, so the table is much smaller than the readings and gives
 * exact type-7 quantiles, MAD, histograms and counts beyond any threshold.
 */
export const readingValueCounts = pgTable(
	'reading_value_counts',
	{
		...summaryGroup(),
		month: date().notNull(),
		value: doublePrecision().notNull(),
		n: integer().notNull()
	},
	(t) => [
		summaryKey('reading_value_counts', t, t.month, t.value),
		check('reading_value_counts_n_non_negative', sql`${t.n} >= 0`)
	]
);
export type ReadingValueCount = typeof readingValueCounts.$inferSelect;

/**
 * The same frequency tables over all time (no month): what a selection without dates reads,
 * a row per distinct value instead of one per value and month.
 */
export const readingValueTotals = pgTable(
	'reading_value_totals',
	{
		...summaryGroup(),
		value: doublePrecision().notNull(),
		n: integer().notNull()
	},
	(t) => [
		summaryKey('reading_value_totals', t, t.value),
		check('reading_value_totals_n_positive', sql`${t.n} > 0`)
	]
);
export type ReadingValueTotal = typeof readingValueTotals.$inferSelect;
