import { sql } from 'drizzle-orm';
import { check, index, pgTable, text } from 'drizzle-orm/pg-core';
import { createdAt, timestampTz, uuidKey } from './columns';
import { roleEnum } from './enums';
import { byUser, shopRef, userRef } from './refs';

/** An owner's invitation to join a shop; the link carries a secret whose hash is kept here. */
export const invitations = pgTable(
	'invitations',
	{
		id: uuidKey(),
		shopId: shopRef(),
		email: text().notNull(),
		role: roleEnum().notNull(),
		tokenHash: text().notNull().unique(),
		invitedBy: byUser(),
		createdAt: createdAt(),
		expiresAt: timestampTz().notNull(),
		acceptedAt: timestampTz(),
		revokedAt: timestampTz()
	},
	(t) => [index('invitations_shop_idx').on(t.shopId, t.createdAt)]
);
export type Invitation = typeof invitations.$inferSelect;

/** Single-use password reset links. */
export const passwordResets = pgTable('password_resets', {
	id: uuidKey(),
	userId: userRef(),
	tokenHash: text().notNull().unique(),
	createdAt: createdAt(),
	expiresAt: timestampTz().notNull(),
	usedAt: timestampTz()
});

/** Sign-in attempts, for the per-address and per-client rate limit (kept in the database so
 * every app server behind a load balancer counts the same attempts). */
export const signInAttempts = pgTable(
	'sign_in_attempts',
	{
		id: uuidKey(),
		email: text().notNull(),
		client: text().notNull(),
		at: timestampTz().notNull().defaultNow(),
		succeeded: text().notNull().default('no')
	},
	(t) => [
		index('sign_in_attempts_email_idx').on(t.email, t.at),
		index('sign_in_attempts_client_idx').on(t.client, t.at),
		check('sign_in_attempts_succeeded', sql`${t.succeeded} in ('yes', 'no')`)
	]
);
