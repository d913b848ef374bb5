import { sql } from 'drizzle-orm';
import { check, index, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { roleEnum } from './enums';
import { shops } from './shops';

/** API tokens: only a SHA-256 hash of the secret is stored; `prefix` is shown to tell them apart. */
export const apiTokens = pgTable(
	'api_tokens',
	{
		id: uuid().primaryKey().defaultRandom(),
		shopId: uuid()
			.notNull()
			.references(() => shops.id, { onDelete: 'cascade' }),
		userId: text()
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		name: text().notNull(),
		prefix: text().notNull(),
		tokenHash: text().notNull().unique(),
		role: roleEnum().notNull(),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		expiresAt: timestamp({ withTimezone: true }),
		lastUsedAt: timestamp({ withTimezone: true }),
		revokedAt: timestamp({ withTimezone: true })
	},
	(t) => [
		index('api_tokens_shop_idx').on(t.shopId, t.createdAt),
		check('api_tokens_name_not_blank', sql`length(trim(${t.name})) between 1 and 80`),
		check('api_tokens_hash_format', sql`${t.tokenHash} ~ '^[0-9a-f]{64}$'`),
	]
);
export type ApiToken = typeof apiTokens.$inferSelect;

