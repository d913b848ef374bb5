// The tables @auth/drizzle-adapter needs, with Auth.js's own table names, plus Lapmark's
// password hash on the user. Property names follow the adapter; columns are snake_case.
import { integer, pgTable, primaryKey, text, timestamp } from 'drizzle-orm/pg-core';

export const users = pgTable('user', {
	id: text()
		.primaryKey()
		.$defaultFn(() => crypto.randomUUID()),
	name: text(),
	email: text().notNull().unique(),
	emailVerified: timestamp({ mode: 'date', withTimezone: true }),
	image: text(),
	passwordHash: text(),
	createdAt: timestamp({ withTimezone: true }).notNull().defaultNow()
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
