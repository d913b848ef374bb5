import { and, eq, gt, sql } from 'drizzle-orm';
import type { Conn } from '../db/scope';
import { signInAttempts, users } from '../db/schema';

export const SIGN_IN_WINDOW_MINUTES = 15;

export async function failedAttemptsSince(conn: Conn, key: { email?: string; client?: string }): Promise<number> {
	const since = sql`now() - make_interval(mins => ${SIGN_IN_WINDOW_MINUTES})`;
	const where = key.email ? eq(signInAttempts.email, key.email) : eq(signInAttempts.client, key.client ?? '');
	const [row] = await conn
		.select({ n: sql<number>`count(*)::int` })
		.from(signInAttempts)
		.where(and(where, eq(signInAttempts.succeeded, 'no'), gt(signInAttempts.at, since)));
	return row.n;
}

export async function recordAttempt(conn: Conn, email: string, client: string, succeeded: boolean): Promise<string> {
	const [row] = await conn
		.insert(signInAttempts)
		.values({ email, client, succeeded: succeeded ? 'yes' : 'no' })
		.returning({ id: signInAttempts.id });
	return row.id;
}

/** An attempt recorded as failed before the password was checked turned out to succeed. */
export async function settleAttempt(conn: Conn, attemptId: string): Promise<void> {
	await conn.update(signInAttempts).set({ succeeded: 'yes' }).where(eq(signInAttempts.id, attemptId));
}

/** A person and their password hash, by address or by id (null when there is no such person). */
export async function passwordHolder(conn: Conn, by: { email: string } | { userId: string }) {
	const [row] = await conn
		.select({ id: users.id, email: users.email, name: users.name, hash: users.passwordHash })
		.from(users)
		.where('email' in by ? eq(users.email, by.email) : eq(users.id, by.userId))
		.limit(1);
	return row ?? null;
}

export async function userExists(conn: Conn, email: string): Promise<boolean> {
	const [row] = await conn.select({ id: users.id }).from(users).where(eq(users.email, email)).limit(1);
	return Boolean(row);
}

/** Sign-in and reset mails queued for an address in the last hour (any client). */
export async function recentAuthMails(conn: Conn, email: string): Promise<number> {
	const rows = await conn.execute<{ n: number }>(sql`
		select count(*)::int as n from mail_outbox
		where "to" = ${email} and kind in ('sign_in_link', 'password_reset') and created_at > now() - interval '1 hour'`);
	return rows[0].n;
}
