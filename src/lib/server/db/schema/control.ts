import { sql } from 'drizzle-orm';
import { check, date, doublePrecision, integer, pgTable, text, unique, uuid } from 'drizzle-orm/pg-core';
import { createdAt, uuidKey } from './columns';
import { measurementEnum, sideEnum, stageEnum } from './enums';
import { families } from './families';
import { byUser, sameShopKey, shopRef } from './refs';

/**
 * The baseline (phase I) period a family × series' control limits come from, with the figures
 * it gave when it was chosen: the limits stay as they were set while later readings are charted
 * (phase II), even if readings of the period are added or edited afterwards. One row per family ×
 * series; each change is in the audit log.
 */
export const controlBaselines = pgTable(
	'control_baselines',
	{
		id: uuidKey(),
		shopId: shopRef(),
		familyId: uuid().notNull(),
		measurement: measurementEnum().notNull(),
		stage: stageEnum().notNull(),
		side: sideEnum().notNull(),
		/** Inclusive UTC days of measured_at. */
		fromDay: date().notNull(),
		toDay: date().notNull(),
		n: integer().notNull(),
		centre: doublePrecision().notNull(),
		mrBar: doublePrecision().notNull(),
		setBy: byUser(),
		/** Who set it, as the audit log names them (kept when the person is removed). */
		setByLabel: text().notNull(),
		setAt: createdAt()
	},
	(t) => [
		sameShopKey('control_baselines_family_fk', t.shopId, t.familyId, families).onDelete('cascade'),
		unique('control_baselines_series_key').on(t.shopId, t.familyId, t.measurement, t.stage, t.side),
		check('control_baselines_days', sql`${t.fromDay} <= ${t.toDay}`),
		check('control_baselines_n', sql`${t.n} >= 2`),
		check('control_baselines_mr_bar', sql`${t.mrBar} >= 0`)
	]
);
export type ControlBaseline = typeof controlBaselines.$inferSelect;
