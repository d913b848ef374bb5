import { sql } from 'drizzle-orm';
import {
	check,
	date,
	doublePrecision,
	index,
	pgTable,
	smallint,
	text,
	unique,
	uuid
} from 'drizzle-orm/pg-core';
import { createdAt, uuidKey } from './columns';
import { measurementEnum, sideEnum, stageEnum } from './enums';
import { byUser, sameShopKey, shopRef } from './refs';

/** An engine family: the layout of its heads and the nominal stem diameters. */
export const families = pgTable(
	'families',
	{
		id: uuidKey(),
		shopId: shopRef(),
		code: text().notNull(),
		description: text().notNull().default(''),
		cylinders: smallint().notNull(),
		intakeValves: smallint().notNull(),
		exhaustValves: smallint().notNull(),
		intakeStemMm: doublePrecision(),
		exhaustStemMm: doublePrecision(),
		createdAt: createdAt()
	},
	(t) => [
		unique('families_shop_code_key').on(t.shopId, t.code),
		// Lets child tables reference (shop, family) together so a row cannot point across shops.
		unique('families_shop_id_key').on(t.shopId, t.id),
		check('families_code_format', sql`${t.code} ~ '^[A-Za-z0-9][A-Za-z0-9._-]{0,31}$'`),
		check('families_cylinders_range', sql`${t.cylinders} between 1 and 16`),
		check('families_intake_valves_range', sql`${t.intakeValves} between 1 and 3`),
		check('families_exhaust_valves_range', sql`${t.exhaustValves} between 1 and 3`),
		check('families_intake_stem_range', sql`${t.intakeStemMm} is null or ${t.intakeStemMm} between 3 and 20`),
		check('families_exhaust_stem_range', sql`${t.exhaustStemMm} is null or ${t.exhaustStemMm} between 3 and 20`)
	]
);
export type Family = typeof families.$inferSelect;

/**
 * Limits per family × measurement × side × stage, versioned by the day they take effect.
 * As-received limits are service limits (reuse or not); final limits are what the shop's own
 * rework must reach. A reading is judged by the version in effect on the day it was taken.
 */
export const limits = pgTable(
	'limits',
	{
		id: uuidKey(),
		shopId: uuid().notNull(),
		familyId: uuid().notNull(),
		measurement: measurementEnum().notNull(),
		side: sideEnum().notNull(),
		stage: stageEnum().notNull(),
		min: doublePrecision(),
		max: doublePrecision(),
		effectiveFrom: date().notNull(),
		note: text().notNull().default(''),
		createdBy: byUser(),
		createdAt: createdAt()
	},
	(t) => [
		sameShopKey('limits_family_fk', t.shopId, t.familyId, families).onDelete('cascade'),
		unique('limits_version_key').on(t.familyId, t.measurement, t.side, t.stage, t.effectiveFrom),
		index('limits_lookup_idx').on(t.shopId, t.familyId, t.measurement, t.stage, t.side, t.effectiveFrom),
		check('limits_has_bound', sql`${t.min} is not null or ${t.max} is not null`),
		check('limits_min_le_max', sql`${t.min} is null or ${t.max} is null or ${t.min} <= ${t.max}`),
		check('limits_non_negative', sql`coalesce(${t.min}, 0) >= 0 and coalesce(${t.max}, 0) >= 0`)
	]
);
export type Limit = typeof limits.$inferSelect;
