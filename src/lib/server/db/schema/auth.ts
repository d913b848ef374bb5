// The tables @auth/drizzle-adapter needs, with Auth.js's own table names, plus Lapmark's
// password hash on the user. Property names follow the adapter; columns are snake_case.
import { sql } from 'drizzle-orm';
import { check, index, integer, pgTable, primaryKey, text, timestamp } from 'drizzle-orm/pg-core';
import { createdAt, timestampTz, uuidKey } from './columns';

export const users = pgTable('user', {
	id: text()
		.primaryKey()
		.$defaultFn(() => crypto.randomUUID()),
	name: text(),
	email: text().notNull().unique(),
	emailVerified: timestamp({ mode: 'date', withTimezone: true }),
	image: text(),
	passwordHash: text(),
	createdAt: createdAt()
});
export type User = typeof users.$inferSelect;

export const accounts = pgTable(
	'account',
	{
		userId: text()
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		type: text().notNull(),
		provider: text().notNull(),
		providerAccountId: text().notNull(),
		refresh_token: text(),
		access_token: text(),
		expires_at: integer(),
		token_type: text(),
		scope: text(),
		id_token: text(),
		session_state: text()
	},
	(t) => [primaryKey({ columns: [t.provider, t.providerAccountId] })]
);

export const sessions = pgTable('session', {
	sessionToken: text().primaryKey(),
	userId: text()
		.notNull()
		.references(() => users.id, { onDelete: 'cascade' }),
	expires: timestamp({ mode: 'date', withTimezone: true }).notNull()
});

export const verificationTokens = pgTable(
	'verificationToken',
	{
		identifier: text().notNull(),
		token: text().notNull(),
		expires: timestamp({ mode: 'date', withTimezone: true }).notNull()
	},
	(t) => [primaryKey({ columns: [t.identifier, t.token] })]
);

/**
 * Lapmark's own server-side sessions (the Auth.js `session` table above is for its database
 * strategy, which Credentials cannot use). The JWT cookie carries `sid`, this row's id; every
 * request checks the row, so a session ends at once when it is revoked (sign-out, a password
 * reset or change, removal from a shop) or sits idle past `idle_expires_at`, and never outlives
 * `expires_at`.
 */
export const userSessions = pgTable(
	'user_sessions',
	{
		id: uuidKey(),
		userId: text()
			.notNull()
			.references(() => users.id, { onDelete: 'cascade' }),
		createdAt: createdAt(),
		lastSeenAt: timestampTz().notNull().defaultNow(),
		idleExpiresAt: timestampTz().notNull(),
		expiresAt: timestampTz().notNull(),
		revokedAt: timestampTz()
	},
	(t) => [index('user_sessions_user_idx').on(t.userId)]
);

/**
 * Mail asked for on a public form whose answer must not tell whether the address has an
 * account (forgot password, sign-in link). The form stores one row and answers at once, the
 * same for every address; a background step then looks the address up and queues the mail in
 * the outbox.
 */
export const authMailRequests = pgTable(
	'auth_mail_requests',
	{
		id: uuidKey(),
		kind: text().notNull(),
		email: text().notNull(),
		/** Sign-in links: the same-origin path to open after signing in. */
		redirectTo: text(),
		createdAt: createdAt(),
		doneAt: timestampTz()
	},
	(t) => [
		index('auth_mail_requests_pending_idx').on(t.createdAt).where(sql`${t.doneAt} is null`),
		check('auth_mail_requests_kind', sql`${t.kind} in ('password_reset', 'sign_in_link')`)
	]
);
