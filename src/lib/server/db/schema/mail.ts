import { sql } from 'drizzle-orm';
import { check, index, integer, pgTable, text, uuid } from 'drizzle-orm/pg-core';
import { createdAt, timestampTz, uuidKey } from './columns';

/**
 * Outgoing mail. A message is queued in the same transaction as the change that causes it
 * and sent after commit; a failed send stays here, shown as not sent, and is retried.
 */
export const mailOutbox = pgTable(
	'mail_outbox',
	{
		id: uuidKey(),
		shopId: uuid(),
		to: text().notNull(),
		subject: text().notNull(),
		text: text().notNull(),
		html: text(),
		kind: text().notNull(),
		createdAt: createdAt(),
		sentAt: timestampTz(),
		attempts: integer().notNull().default(0),
		lastError: text(),
		nextAttemptAt: timestampTz().notNull().defaultNow()
	},
	(t) => [
		index('mail_outbox_pending_idx').on(t.nextAttemptAt).where(sql`${t.sentAt} is null`),
		// The hourly limit of sign-in and reset mails per address (auth/rate-limit.ts).
		index('mail_outbox_to_idx').on(t.to, t.createdAt),
		check('mail_outbox_to_format', sql`${t.to} ~ '^[^@\\s]+@[^@\\s]+$' and length(${t.to}) <= 254`)
	]
);
export type MailMessage = typeof mailOutbox.$inferSelect;
