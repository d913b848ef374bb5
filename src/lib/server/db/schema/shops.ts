import { sql } from 'drizzle-orm';
import { check, index, jsonb, pgTable, primaryKey, text, uuid } from 'drizzle-orm/pg-core';
import type { Currency, ShopDistanceUnit, ShopLengthUnit } from '../../../shop-settings';
import { users } from './auth';
import { createdAt, timestampTz, uuidKey } from './columns';
import { roleEnum } from './enums';

export interface ShopSettings {
	/** What an import does with rejected rows when the request does not say. */
	onReject?: 'abort' | 'skip';
	/** Seconds without a drip that pass a bench fluid test (common practice: 120). */
	fluidHoldPassSeconds?: number;
	/** Share of applied vacuum a valve must hold to pass (common practice: 90 %). */
	vacuumHoldPassPct?: number;
}

export const shops = pgTable(
	'shops',
	{
		id: uuidKey(),
		name: text().notNull(),
		slug: text().notNull().unique(),
		settings: jsonb().$type<ShopSettings>().notNull().default({}),
		/** The shop's units and currency, chosen when it was created (the data stays canonical). */
		lengthUnit: text().$type<ShopLengthUnit>().notNull().default('mm'),
		distanceUnit: text().$type<ShopDistanceUnit>().notNull().default('km'),
		currency: text().$type<Currency>().notNull().default('EUR'),
		createdAt: createdAt()
	},
	(t) => [
		check('shops_name_not_blank', sql`length(trim(${t.name})) between 1 and 120`),
		check('shops_slug_format', sql`${t.slug} ~ '^[a-z0-9][a-z0-9-]{1,62}$'`),
		check('shops_length_unit', sql`${t.lengthUnit} in ('mm', 'in')`),
		check('shops_distance_unit', sql`${t.distanceUnit} in ('km', 'mi')`),
		check('shops_currency_code', sql`${t.currency} ~ '^[A-Z]{3}$'`)
	]
);
export type Shop = typeof shops.$inferSelect;

export const memberships = pgTable(
	'memberships',
	{
		shopId: uuid()
			.notNull()
			.references(() => shops.id, { onDelete: 'cascade' }),
		userId: text()
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		role: roleEnum().notNull(),
		createdAt: createdAt()
	},
	(t) => [primaryKey({ columns: [t.shopId, t.userId] }), index('memberships_user_idx').on(t.userId)]
);
export type Membership = typeof memberships.$inferSelect;

/**
 * A shop sign-up waiting for its address to be proven: nothing here is usable until the link
 * e-mailed to `email` is opened (then the user, the shop and the membership are made at once).
 * Not shop-owned: no shop exists yet. Only the link's hash and the password's hash are kept.
 */
export const shopSignups = pgTable(
	'shop_signups',
	{
		id: uuidKey(),
		email: text().notNull(),
		ownerName: text().notNull(),
		passwordHash: text().notNull(),
		shopName: text().notNull(),
		lengthUnit: text().$type<ShopLengthUnit>().notNull(),
		distanceUnit: text().$type<ShopDistanceUnit>().notNull(),
		currency: text().$type<Currency>().notNull(),
		tokenHash: text().notNull().unique(),
		createdAt: createdAt(),
		expiresAt: timestampTz().notNull(),
		confirmedAt: timestampTz(),
		shopId: uuid().references(() => shops.id, { onDelete: 'set null' })
	},
	(t) => [index('shop_signups_email_idx').on(t.email, t.createdAt)]
);
export type ShopSignup = typeof shopSignups.$inferSelect;
