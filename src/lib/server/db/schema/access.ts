import { sql } from 'drizzle-orm';
import { check, index, pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { roleEnum } from './enums';
import { shops } from './shops';

/** An owner's invitation to join a shop; the link carries a secret whose hash is kept here. */
export const invitations = pgTable(
	'invitations',
	{
		id: uuid().primaryKey().defaultRandom(),
		shopId: uuid()
			.notNull()
			.references(() => shops.id, { onDelete: 'cascade' }),
		email: text().notNull(),
		role: roleEnum().notNull(),
		tokenHash: text().notNull().unique(),
		invitedBy: text().references(() => users.id, { onDelete: 'set null' }),
		createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
		expiresAt: timestamp({ withTimezone: true }).notNull(),
		acceptedAt: timestamp({ withTimezone: true }),
		revokedAt: timestamp({ withTimezone: true })
	},
	(t) => [index('invitations_shop_idx').on(t.shopId, t.createdAt)]
);
export type Invitation = typeof invitations.$inferSelect;

/** Single-use password reset links. */
export const passwordResets = pgTable('password_resets', {
	id: uuid().primaryKey().defaultRandom(),
	userId: text()
		.notNull()
		.references(() => users.id, { onDelete: 'cascade' }),
	tokenHash: text().notNull().unique(),
	createdAt: timestamp({ withTimezone: true }).notNull().defaultNow(),
	expiresAt: timestamp({ withTimezone: true }).notNull(),
	usedAt: timestamp({ withTimezone: true })
});

/** Sign-in attempts, for the per-address and per-client rate limit (kept in the database so
 * every app server behind a load balancer counts the same attempts). */
export const signInAttempts = pgTable(
	'sign_in_attempts',
	{
		id: uuid().primaryKey().defaultRandom(),
		email: text().notNull(),
		client: text().notNull(),
		at: timestamp({ withTimezone: true }).notNull().defaultNow(),
		succeeded: text().notNull().default('no')
	},
	(t) => [
		index('sign_in_attempts_email_idx').on(t.email, t.at),
		index('sign_in_attempts_client_idx').on(t.client, t.at),
		check('sign_in_attempts_succeeded', sql`${t.succeeded} in ('yes', 'no')`)
	]
);
