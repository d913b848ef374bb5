import { sql } from 'drizzle-orm';
import { check, index, jsonb, pgTable, primaryKey, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
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
		id: uuid().primaryKey().defaultRandom(),
		name: text().notNull(),
		slug: text().notNull().unique(),
		settings: jsonb().$type<ShopSettings>().notNull().default({}),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [
		check('shops_name_not_blank', sql`length(trim(${t.name})) between 1 and 120`),
		check('shops_slug_format', sql`${t.slug} ~ '^[a-z0-9][a-z0-9-]{1,62}$'`)
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
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
	},
	(t) => [primaryKey({ columns: [t.shopId, t.userId] }), index('memberships_user_idx').on(t.userId)]
);
export type Membership = typeof memberships.$inferSelect;
