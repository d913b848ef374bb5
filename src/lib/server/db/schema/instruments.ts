import { sql } from 'drizzle-orm';
import { boolean, check, date, doublePrecision, foreignKey, index, integer, pgTable, text, timestamp, unique, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { shops } from './shops';

/** Gauges and their calibration. A reading taken after `calibratedOn + intervalDays` is flagged. */
export const instruments = pgTable(
	'instruments',
	{
		id: uuid().primaryKey().defaultRandom(),
		shopId: uuid()
			.notNull()
			.references(() => shops.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		kind: text().notNull(),
		serial: text().notNull(),
		resolutionMm: doublePrecision(),
		calibratedOn: date().notNull(),
		intervalDays: integer().notNull(),
		retired: boolean().notNull().default(false),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
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
		id: uuid().primaryKey().defaultRandom(),
		shopId: uuid().notNull(),
		instrumentId: uuid().notNull(),
		calibratedOn: date().notNull(),
		intervalDays: integer().notNull(),
		note: text().notNull().default(''),
		recordedBy: text().references(() => users.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [
		foreignKey({ name: 'instrument_calibrations_instrument_fk', columns: [t.shopId, t.instrumentId], foreignColumns: [instruments.shopId, instruments.id] }).onDelete('cascade'),
		unique('instrument_calibrations_day_key').on(t.instrumentId, t.calibratedOn),
		check('instrument_calibrations_interval_range', sql`${t.intervalDays} between 1 and 3650`)
	]
);
export type InstrumentCalibration = typeof instrumentCalibrations.$inferSelect;
