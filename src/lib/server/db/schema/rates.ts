import { sql } from 'drizzle-orm';
import { check, date, integer, pgTable, primaryKey, smallint, uuid } from 'drizzle-orm/pg-core';

/**
 * What the rates of a measurement read (queries/stats/rates.ts): valve positions judged against
 * the limits of their reading's day, and how many failed, per shop × series × family × month ×
 * cylinder. Kept by statement-level triggers on readings and on limits (drizzle/0013: a new,
 * edited or deleted limit version re-judges its family × series), derived data only, like the
 * summaries in stats.ts (no foreign keys, for the same reason).
 *
 * A position (head × cylinder × side × valve) can have readings of one series in several months
 * (re-measures). So that months pool exactly, each position is entered once per month it was
 * judged in, together with the previous month it was judged in (`prev_month`; '-infinity' for its
 * first), and once per month it failed in, with the previous month it failed in. The positions
 * judged in the months [a, b) are then the entries with a ≤ month < b and prev_month < a: exactly one
 * entry per position, its first judged month in the range. The same holds for failures. Counted
 * per month regardless of `prev_month`, they are the positions judged (failing) in that month.
 */
export const readingPositionTallies = pgTable(
	'reading_position_tallies',
	{
		shopId: uuid().notNull(),
		/** measurement × stage × side, as readings.series_key. */
		seriesKey: smallint().notNull(),
		familyId: uuid().notNull(),
		/** First day of the month (UTC) the position was judged in. */
		month: date().notNull(),
		cylinder: smallint().notNull(),
		/** The position's previous month of the same kind (judged, or failed); '-infinity' for none. */
		prevMonth: date().notNull(),
		/** Positions judged in `month` whose previous judged month is `prev_month`. */
		checked: integer().notNull(),
		/** Positions with a reading outside the limits in `month` whose previous such month is `prev_month`. */
		failed: integer().notNull()
	},
	(t) => [
		primaryKey({ name: 'reading_position_tallies_pkey', columns: [t.shopId, t.seriesKey, t.familyId, t.month, t.cylinder, t.prevMonth] }),
		check('reading_position_tallies_counts', sql`${t.checked} >= 0 and ${t.failed} >= 0 and ${t.checked} + ${t.failed} > 0`)
	]
);
export type ReadingPositionTally = typeof readingPositionTallies.$inferSelect;
