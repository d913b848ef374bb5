import { sql } from 'drizzle-orm';
import {
	type AnyPgColumn,
	check,
	date,
	doublePrecision,
	index,
	integer,
	jsonb,
	pgTable,
	smallint,
	text,
	unique,
	uuid
} from 'drizzle-orm/pg-core';
import { createdAt, cylinderCheck, timestampTz, uuidKey, valvePosition, valvePositionChecks } from './columns';
import { decisionKindEnum, headStatusEnum, leakPathEnum } from './enums';
import { families } from './families';
import { byUser, sameShopKey, shopRef } from './refs';

/** One cylinder head job: the head as it came in, and where it is in the shop. */
export const heads = pgTable(
	'heads',
	{
		id: uuidKey(),
		shopId: shopRef(),
		familyId: uuid().notNull(),
		serial: text().notNull(),
		customer: text().notNull().default(''),
		customerEmail: text(),
		receivedOn: date().notNull(),
		releasedOn: date(),
		mileageKm: integer(),
		engineHours: integer(),
		complaint: text().notNull().default(''),
		status: headStatusEnum().notNull().default('received'),
		/** Set on a job that brings a released head back: the original job. */
		comebackOf: uuid().references((): AnyPgColumn => heads.id, { onDelete: 'set null' }),
		/** Who released the head, and the owner's written reason when it went out over a failing check. */
		releasedBy: byUser(),
		releaseOverrideReason: text(),
		/** The import that created this head, so undoing the import can remove it. */
		createdByBatch: uuid(),
		createdAt: createdAt()
	},
	(t) => [
		sameShopKey('heads_family_fk', t.shopId, t.familyId, families).onUpdate('cascade'),
		unique('heads_shop_serial_key').on(t.shopId, t.serial),
		unique('heads_shop_id_family_key').on(t.shopId, t.id, t.familyId),
		unique('heads_shop_id_key').on(t.shopId, t.id),
		index('heads_shop_received_idx').on(t.shopId, t.receivedOn),
		index('heads_family_idx').on(t.familyId),
		index('heads_comeback_idx').on(t.comebackOf),
		check('heads_serial_format', sql`length(trim(${t.serial})) between 1 and 64`),
		check('heads_mileage_range', sql`${t.mileageKm} is null or ${t.mileageKm} between 0 and 5000000`),
		check('heads_hours_range', sql`${t.engineHours} is null or ${t.engineHours} between 0 and 500000`),
		check('heads_released_after_received', sql`${t.releasedOn} is null or ${t.releasedOn} >= ${t.receivedOn}`),
		check('heads_released_status', sql`(${t.status} = 'released') = (${t.releasedOn} is not null)`),
		check('heads_not_own_comeback', sql`${t.comebackOf} is null or ${t.comebackOf} <> ${t.id}`),
		check('heads_override_when_released', sql`${t.releaseOverrideReason} is null or (${t.status} = 'released' and length(trim(${t.releaseOverrideReason})) between 10 and 2000)`)
	]
);
export type Head = typeof heads.$inferSelect;

/** In-vehicle cylinder leakage (leak-down) result that came with the job, per cylinder. */
export const cylinderLeakage = pgTable(
	'cylinder_leakage',
	{
		id: uuidKey(),
		shopId: uuid().notNull(),
		headId: uuid().notNull(),
		cylinder: smallint().notNull(),
		leakagePct: doublePrecision().notNull(),
		pressureInKpa: doublePrecision(),
		pressureHeldKpa: doublePrecision(),
		leakPath: leakPathEnum().notNull().default('none'),
		createdAt: createdAt()
	},
	(t) => [
		sameShopKey('cylinder_leakage_head_fk', t.shopId, t.headId, heads).onDelete('cascade'),
		unique('cylinder_leakage_head_cylinder_key').on(t.headId, t.cylinder),
		cylinderCheck('cylinder_leakage', t.cylinder),
		check('cylinder_leakage_pct_range', sql`${t.leakagePct} between 0 and 100`),
		check(
			'cylinder_leakage_pressures',
			sql`(${t.pressureInKpa} is null and ${t.pressureHeldKpa} is null) or (${t.pressureInKpa} > 0 and ${t.pressureHeldKpa} between 0 and ${t.pressureInKpa})`
		)
	]
);

/** The decision per valve position: what the readings suggested and what a person chose. */
export const decisions = pgTable(
	'decisions',
	{
		id: uuidKey(),
		shopId: uuid().notNull(),
		headId: uuid().notNull(),
		...valvePosition(),
		suggested: decisionKindEnum(),
		rule: text().notNull().default(''),
		kind: decisionKindEnum().notNull(),
		note: text().notNull().default(''),
		decidedBy: byUser(),
		decidedAt: timestampTz().notNull().defaultNow()
	},
	(t) => [
		sameShopKey('decisions_head_fk', t.shopId, t.headId, heads).onDelete('cascade'),
		unique('decisions_position_key').on(t.headId, t.cylinder, t.side, t.valve),
		index('decisions_shop_kind_idx').on(t.shopId, t.kind),
		...valvePositionChecks('decisions', t)
	]
);
export type Decision = typeof decisions.$inferSelect;

export interface PositionRef {
	cylinder: number;
	side: 'intake' | 'exhaust';
	valve: number;
}

/**
 * What came back and why. The comeback itself is a head row of its own (`heads.comeback_of` =
 * the original job, received on the day it came back, with its mileage); this row holds what
 * failed and which valve positions, so comeback rates can be counted per family and position.
 */
export const comebacks = pgTable(
	'comebacks',
	{
		id: uuidKey(),
		shopId: uuid().notNull(),
		headId: uuid().notNull(),
		originalHeadId: uuid().notNull(),
		whatFailed: text().notNull(),
		positions: jsonb().$type<PositionRef[]>().notNull().default([]),
		recordedBy: byUser(),
		createdAt: createdAt()
	},
	(t) => [
		sameShopKey('comebacks_head_fk', t.shopId, t.headId, heads).onDelete('cascade'),
		sameShopKey('comebacks_original_fk', t.shopId, t.originalHeadId, heads).onDelete('cascade'),
		unique('comebacks_head_key').on(t.headId),
		index('comebacks_original_idx').on(t.originalHeadId),
		check('comebacks_not_own', sql`${t.headId} <> ${t.originalHeadId}`),
		check('comebacks_what_failed', sql`length(trim(${t.whatFailed})) between 1 and 2000`),
		check('comebacks_positions_array', sql`jsonb_typeof(${t.positions}) = 'array'`)
	]
);
export type Comeback = typeof comebacks.$inferSelect;
