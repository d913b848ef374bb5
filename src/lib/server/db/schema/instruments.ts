import { sql } from 'drizzle-orm';
import { boolean, check, date, doublePrecision, index, integer, pgTable, text, unique, uuid } from 'drizzle-orm/pg-core';
import { createdAt, uuidKey } from './columns';
import { byUser, sameShopKey, shopRef } from './refs';

/** Gauges and their calibration. A reading taken after `calibratedOn + intervalDays` is flagged. */
export const instruments = pgTable(
	'instruments',
	{
		id: uuidKey(),
		shopId: shopRef(),
		name: text().notNull(),
		kind: text().notNull(),
		serial: text().notNull(),
		resolutionMm: doublePrecision(),
		calibratedOn: date().notNull(),
		intervalDays: integer().notNull(),
		retired: boolean().notNull().default(false),
		createdAt: createdAt()
	},
	(t) => [
		unique('instruments_shop_serial_key').on(t.shopId, t.serial),
		unique('instruments_shop_id_key').on(t.shopId, t.id),
		index('instruments_shop_idx').on(t.shopId),
		check('instruments_interval_range', sql`${t.intervalDays} between 1 and 3650`),
		check('instruments_resolution_range', sql`${t.resolutionMm} is null or ${t.resolutionMm} > 0`),
		check('instruments_name_not_blank', sql`length(trim(${t.name})) > 0`)
	]
);
export type Instrument = typeof instruments.$inferSelect;

/**
 * Every calibration of a gauge, so a reading is judged by the calibration in effect on its
 * day. `instruments.calibrated_on` / `interval_days` repeat the latest one.
 */
export const instrumentCalibrations = pgTable(
	'instrument_calibrations',
	{
		id: uuidKey(),
		shopId: uuid().notNull(),
		instrumentId: uuid().notNull(),
		calibratedOn: date().notNull(),
		intervalDays: integer().notNull(),
		note: text().notNull().default(''),
		recordedBy: byUser(),
		createdAt: createdAt()
	},
	(t) => [
		sameShopKey('instrument_calibrations_instrument_fk', t.shopId, t.instrumentId, instruments).onDelete('cascade'),
		unique('instrument_calibrations_day_key').on(t.instrumentId, t.calibratedOn),
		check('instrument_calibrations_interval_range', sql`${t.intervalDays} between 1 and 3650`)
	]
);
export type InstrumentCalibration = typeof instrumentCalibrations.$inferSelect;
