import { sql } from 'drizzle-orm';
import { bigint, check, index, jsonb, pgTable, text } from 'drizzle-orm/pg-core';
import { timestampTz } from './columns';
import { shopRef } from './refs';

/** Who changed what, when, from what to what. Written in the same transaction as the change. */
export const auditLog = pgTable(
	'audit_log',
	{
		id: bigint({ mode: 'number' }).primaryKey().generatedAlwaysAsIdentity(),
		shopId: shopRef(),
		actorUserId: text(),
		actorLabel: text().notNull(),
		at: timestampTz().notNull().defaultNow(),
		entity: text().notNull(),
		entityId: text().notNull(),
		action: text().notNull(),
		before: jsonb(),
		after: jsonb()
	},
	(t) => [
		index('audit_log_shop_at_idx').on(t.shopId, t.at),
		index('audit_log_entity_idx').on(t.shopId, t.entity, t.entityId),
		check('audit_log_action', sql`${t.action} in ('create', 'update', 'delete', 'undo', 'override', 'revoke', 'import')`)
	]
);
export type AuditEntry = typeof auditLog.$inferSelect;
