import { sql } from 'drizzle-orm';
import {
	bigint,
	check,
	doublePrecision,
	foreignKey,
	index,
	pgTable,
	smallint,
	text,
	timestamp,
	unique,
	uuid
} from 'drizzle-orm/pg-core';
import { users } from './auth';
import { boreDirectionEnum, boreHeightEnum, measurementEnum, sideEnum, stageEnum } from './enums';
import { heads } from './heads';
import { importBatches } from './imports';
import { instruments } from './instruments';

/**
 * Readings in long form: one row per head × stage × cylinder × side × valve × measurement ×
 * time, the value in the measurement's canonical unit (mm, µm, %, s). `familyId` repeats the
 * head's family (kept equal by a composite foreign key) so analytics filter without a join.
 */
export const readings = pgTable(
	'readings',
	{
		id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
		shopId: uuid().notNull(),
		headId: uuid().notNull(),
		familyId: uuid().notNull(),
		stage: stageEnum().notNull(),
		cylinder: smallint().notNull(),
		side: sideEnum().notNull(),
		valve: smallint().notNull(),
		measurement: measurementEnum().notNull(),
		value: doublePrecision().notNull(),
		measuredAt: timestamp({ withTimezone: true }).notNull(),
		measuredBy: text().notNull(),
		instrumentId: uuid(),
		batchId: uuid(),
		/**
		 * measurement × stage × side as one small integer (lapmark_series() in
		 * drizzle/0004_stats_summaries.sql; seriesKey() in $lib/server/db/series.ts). Row-level
		 * security lets an index use only leakproof comparisons, and enum equality is not marked
		 * leakproof, so `measurement = …` can never narrow an index scan on this table;
		 * `series_key = …` can.
		 */
		seriesKey: smallint()
			.notNull()
			.generatedAlwaysAs(sql`lapmark_series(measurement, stage, side)`)
	},
	(t) => [
		foreignKey({
			name: 'readings_head_fk',
			columns: [t.shopId, t.headId, t.familyId],
			foreignColumns: [heads.shopId, heads.id, heads.familyId]
		})
			.onDelete('cascade')
			.onUpdate('cascade'),
		foreignKey({
			name: 'readings_instrument_fk',
			columns: [t.shopId, t.instrumentId],
			foreignColumns: [instruments.shopId, instruments.id]
		}),
		foreignKey({
			name: 'readings_batch_fk',
			columns: [t.shopId, t.batchId],
			foreignColumns: [importBatches.shopId, importBatches.id]
		}),
		unique('readings_identity_key').on(t.headId, t.stage, t.cylinder, t.side, t.valve, t.measurement, t.measuredAt),
		index('readings_analytics_idx').on(t.shopId, t.measurement, t.stage, t.side, t.familyId),
		index('readings_batch_idx').on(t.batchId),
		// In the database it also INCLUDEs (value, head_id, cylinder, valve), which Drizzle cannot
		// express: see drizzle/0004_stats_summaries.sql.
		index('readings_series_idx').on(t.shopId, t.seriesKey, t.familyId, t.measuredAt),
		check('readings_cylinder_range', sql`${t.cylinder} between 1 and 16`),
		check('readings_valve_range', sql`${t.valve} between 1 and 3`),
		check('readings_value_finite', sql`${t.value} >= 0 and ${t.value} < 'Infinity'::float8`),
		check(
			'readings_value_plausible',
			sql`case ${t.measurement}
				when 'clearance' then ${t.value} <= 1
				when 'face_runout' then ${t.value} <= 2
				when 'seat_runout' then ${t.value} <= 2
				when 'stem_diameter' then ${t.value} between 1 and 30
				when 'guide_bore' then ${t.value} between 1 and 30
				when 'seat_width' then ${t.value} <= 10
				when 'margin' then ${t.value} <= 10
				when 'roughness_ra' then ${t.value} <= 50
				when 'vacuum_hold' then ${t.value} <= 100
				when 'leakdown' then ${t.value} <= 100
				when 'fluid_hold' then ${t.value} <= 3600
				else true end`
		),
		check('readings_measured_by_not_blank', sql`length(trim(${t.measuredBy})) between 1 and 120`)
	]
);
export type Reading = typeof readings.$inferSelect;

/**
 * The raw guide bore gauge readings behind a position's `guide_bore` and `clearance`: two
 * directions 90° apart at up to three heights. One current value per cell (a correction
 * replaces it; the audit log keeps what it was). The largest of them is stored in `readings`
 * as the position's guide bore, and the clearance is that minus the stem diameter.
 */
export const boreReadings = pgTable(
	'bore_readings',
	{
		id: uuid().primaryKey().defaultRandom(),
		shopId: uuid().notNull(),
		headId: uuid().notNull(),
		stage: stageEnum().notNull(),
		cylinder: smallint().notNull(),
		side: sideEnum().notNull(),
		valve: smallint().notNull(),
		direction: boreDirectionEnum().notNull(),
		height: boreHeightEnum().notNull(),
		valueMm: doublePrecision().notNull(),
		measuredAt: timestamp({ withTimezone: true }).notNull(),
		measuredBy: text().notNull(),
		instrumentId: uuid(),
		enteredBy: text().references(() => users.id, { onDelete: 'set null' })
	},
	(t) => [
		foreignKey({ name: 'bore_readings_head_fk', columns: [t.shopId, t.headId], foreignColumns: [heads.shopId, heads.id] }).onDelete('cascade'),
		foreignKey({ name: 'bore_readings_instrument_fk', columns: [t.shopId, t.instrumentId], foreignColumns: [instruments.shopId, instruments.id] }),
		unique('bore_readings_cell_key').on(t.headId, t.stage, t.cylinder, t.side, t.valve, t.direction, t.height),
		check('bore_readings_cylinder_range', sql`${t.cylinder} between 1 and 16`),
		check('bore_readings_valve_range', sql`${t.valve} between 1 and 3`),
		check('bore_readings_value_plausible', sql`${t.valueMm} between 1 and 30`),
		check('bore_readings_measured_by_not_blank', sql`length(trim(${t.measuredBy})) between 1 and 120`)
	]
);
export type BoreReading = typeof boreReadings.$inferSelect;
