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
	unique,
	uuid
} from 'drizzle-orm/pg-core';
import { measuredByCheck, timestampTz, uuidKey, valvePosition, valvePositionChecks } from './columns';
import { boreDirectionEnum, boreHeightEnum, measurementEnum, stageEnum } from './enums';
import { heads } from './heads';
import { importBatches } from './imports';
import { instruments } from './instruments';
import { byUser, sameShopKey } from './refs';

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
		...valvePosition(),
		measurement: measurementEnum().notNull(),
		value: doublePrecision().notNull(),
		measuredAt: timestampTz().notNull(),
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
		sameShopKey('readings_instrument_fk', t.shopId, t.instrumentId, instruments),
		sameShopKey('readings_batch_fk', t.shopId, t.batchId, importBatches),
		unique('readings_identity_key').on(t.headId, t.stage, t.cylinder, t.side, t.valve, t.measurement, t.measuredAt),
		index('readings_analytics_idx').on(t.shopId, t.measurement, t.stage, t.side, t.familyId),
		index('readings_batch_idx').on(t.batchId),
		// In the database it also INCLUDEs (value, head_id, cylinder, valve), which Drizzle cannot
		// express: see drizzle/0004_stats_summaries.sql.
		index('readings_series_idx').on(t.shopId, t.seriesKey, t.familyId, t.measuredAt),
		...valvePositionChecks('readings', t),
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
		measuredByCheck('readings', t.measuredBy)
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
		id: uuidKey(),
		shopId: uuid().notNull(),
		headId: uuid().notNull(),
		stage: stageEnum().notNull(),
		...valvePosition(),
		direction: boreDirectionEnum().notNull(),
		height: boreHeightEnum().notNull(),
		valueMm: doublePrecision().notNull(),
		measuredAt: timestampTz().notNull(),
		measuredBy: text().notNull(),
		instrumentId: uuid(),
		enteredBy: byUser()
	},
	(t) => [
		sameShopKey('bore_readings_head_fk', t.shopId, t.headId, heads).onDelete('cascade'),
		sameShopKey('bore_readings_instrument_fk', t.shopId, t.instrumentId, instruments),
		unique('bore_readings_cell_key').on(t.headId, t.stage, t.cylinder, t.side, t.valve, t.direction, t.height),
		...valvePositionChecks('bore_readings', t),
		check('bore_readings_value_plausible', sql`${t.valueMm} between 1 and 30`),
		measuredByCheck('bore_readings', t.measuredBy)
	]
);
export type BoreReading = typeof boreReadings.$inferSelect;
