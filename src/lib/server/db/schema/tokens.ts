import { sql } from 'drizzle-orm';
import { check, index, pgTable, text } from 'drizzle-orm/pg-core';
import { createdAt, timestampTz, uuidKey } from './columns';
import { roleEnum } from './enums';
import { shopRef, userRef } from './refs';

/** API tokens: only a SHA-256 hash of the secret is stored; `prefix` is shown to tell them apart. */
export const apiTokens = pgTable(
	'api_tokens',
	{
		id: uuidKey(),
		shopId: shopRef(),
		userId: userRef(),
		name: text().notNull(),
		prefix: text().notNull(),
		tokenHash: text().notNull().unique(),
		role: roleEnum().notNull(),
		createdAt: createdAt(),
		expiresAt: timestampTz(),
		lastUsedAt: timestampTz(),
		revokedAt: timestampTz()
	},
	(t) => [
		index('api_tokens_shop_idx').on(t.shopId, t.createdAt),
		check('api_tokens_name_not_blank', sql`length(trim(${t.name})) between 1 and 80`),
		check('api_tokens_hash_format', sql`${t.tokenHash} ~ '^[0-9a-f]{64}$'`),
	]
);
export type ApiToken = typeof apiTokens.$inferSelect;

