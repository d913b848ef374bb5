// Server-side sessions behind the JWT cookie. The cookie carries the session's id (`sid`); each
// request checks that row (in the actor's one round trip, see actor.ts), so a session can be
// ended on the server at once: sign-out ends it, a password reset or change and removal from a
// shop end every session of that person.
//
// Lifetimes: a session ends after SESSION_IDLE_HOURS without a request, and SESSION_MAX_DAYS
// after it began whatever happens (the README's security section says the same).
import { and, eq, isNull, ne, sql } from 'drizzle-orm';
import type { Conn } from '../db/scope';
import { userSessions } from '../db/schema';

export const SESSION_IDLE_HOURS = 12;
export const SESSION_MAX_DAYS = 14;
/** last_seen_at / idle_expires_at are written at most this often per session. */
const TOUCH_EVERY_SECONDS = 60;

const idle = sql`make_interval(hours => ${SESSION_IDLE_HOURS})`;

/** Starts a session for a person who has just proven who they are; returns its id. */
export async function startSession(conn: Conn, userId: string): Promise<string> {
	const [row] = await conn
		.insert(userSessions)
		.values({
			userId,
			idleExpiresAt: sql`now() + ${idle}`,
			expiresAt: sql`now() + make_interval(days => ${SESSION_MAX_DAYS})`
		})
		.returning({ id: userSessions.id });
	return row.id;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * True when the session is live (the person's, not revoked, not idle too long, not past its
 * absolute end). Pushes the idle end forward, at most once a minute. One statement.
 */
export async function sessionIsLive(conn: Conn, sessionId: string, userId: string): Promise<boolean> {
	if (!UUID.test(sessionId)) return false;
	const rows = await conn.execute<{ id: string }>(sql`
		with live as (
			select id, last_seen_at from user_sessions
			where id = ${sessionId} and user_id = ${userId} and revoked_at is null
				and idle_expires_at > now() and expires_at > now()
		), touched as (
			update user_sessions s
			set last_seen_at = now(), idle_expires_at = least(now() + ${idle}, s.expires_at)
			from live
			where s.id = live.id and live.last_seen_at < now() - make_interval(secs => ${TOUCH_EVERY_SECONDS})
			returning s.id
		)
		select id from live`);
	return rows.length === 1;
}

/** Ends one session (sign-out). */
export async function endSession(conn: Conn, sessionId: string): Promise<void> {
	if (!UUID.test(sessionId)) return;
	await conn.update(userSessions).set({ revokedAt: sql`now()` }).where(and(eq(userSessions.id, sessionId), isNull(userSessions.revokedAt)));
}

/** Ends every session of a person, except `keep` (the one that just changed the password).
 * Returns how many were ended. */
export async function endSessionsOf(conn: Conn, userId: string, keep?: string | null): Promise<number> {
	const rows = await conn
		.update(userSessions)
		.set({ revokedAt: sql`now()` })
		.where(and(eq(userSessions.userId, userId), isNull(userSessions.revokedAt), keep && UUID.test(keep) ? ne(userSessions.id, keep) : undefined))
		.returning({ id: userSessions.id });
	return rows.length;
}
