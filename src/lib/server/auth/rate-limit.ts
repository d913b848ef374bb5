// Sign-in rate limit, counted in the database so every app server sees the same attempts.
//
// What is counted: failed attempts (wrong password, and every sign-in link asked for) per
// e-mail address × client address, in a 15-minute window, since that pair's last success.
// The first PER_ADDRESS of them go through at once; after that each further attempt of that
// pair must wait a growing delay after the last one (30 s, 1 min, 2 min … up to 15 min).
//
// Why per address × client and a back-off rather than a lock of the address: a lock of the
// address for everyone lets anybody lock anybody out (ten wrong passwords from anywhere and the
// owner cannot sign in for 15 minutes). Counted per pair, an attacker only slows down their own
// guesses; the owner, from another client, signs in as usual. Guessing from many client
// addresses is held back by the per-client limit (LAPMARK_SIGNIN_CLIENT_LIMIT failures per
// client across all addresses in 15 minutes), bcrypt and the 10-character minimum password.
// A shop's machines often share one address behind a router, so that limit is the higher one.
//
// Atomic: claimAttempt() takes a transaction-scoped advisory lock on the client, checks and
// records the attempt before the password is checked, so 30 parallel guesses cannot all pass
// the check before any of them is counted.
import { sql } from 'drizzle-orm';
import { db } from '../db';
import type { Conn } from '../db/scope';
import { env } from '../env';
import { SIGN_IN_WINDOW_MINUTES, recordAttempt, settleAttempt as settleAttemptRow } from '../queries/sign-in';

/** Sign-in links and password resets mailed to one address per hour, from all clients
 * together: beyond it no more are sent (the answer stays the same), so a mailbox cannot be
 * flooded from many client addresses. Password sign-in is not affected. */
export const MAILS_PER_ADDRESS_HOUR = 20;

/** Failed attempts per address × client that go through without waiting. */
export const PER_ADDRESS = 10;
/** The first delay after PER_ADDRESS failures; it doubles with each further failure. */
export const FIRST_DELAY_SECONDS = 30;
const MAX_DELAY_SECONDS = SIGN_IN_WINDOW_MINUTES * 60;

interface AttemptState {
	pairFailures: number;
	/** Seconds since the pair's last failure (null: none in the window). */
	sinceLastFailure: number | null;
	clientFailures: number;
}

async function attemptState(conn: Conn, email: string, client: string): Promise<AttemptState> {
	const window = sql`now() - make_interval(mins => ${SIGN_IN_WINDOW_MINUTES})`;
	const [row] = await conn.execute<{ pair: number; since: number | null; client: number }>(sql`
		with pair as (
			select at, succeeded from sign_in_attempts
			where email = ${email} and client = ${client} and at > ${window}
		), fresh as (
			select at from pair
			where succeeded = 'no' and at > coalesce((select max(at) from pair where succeeded = 'yes'), '-infinity')
		)
		select (select count(*)::int from fresh) as pair,
			(select extract(epoch from now() - max(at))::float8 from fresh) as since,
			(select count(*)::int from sign_in_attempts where client = ${client} and succeeded = 'no' and at > ${window}) as client`);
	return { pairFailures: row.pair, sinceLastFailure: row.since, clientFailures: row.client };
}

function waitWords(seconds: number): string {
	if (seconds < 120) return `${Math.max(1, Math.ceil(seconds))} seconds`;
	return `${Math.ceil(seconds / 60)} minutes`;
}

/** The refusal for this state, or null when the attempt may go ahead. */
export function refusal(s: AttemptState, clientLimit = env.LAPMARK_SIGNIN_CLIENT_LIMIT): string | null {
	if (s.clientFailures >= clientLimit) {
		return `Too many sign-in attempts from your network. Wait ${SIGN_IN_WINDOW_MINUTES} minutes and try again.`;
	}
	if (s.pairFailures < PER_ADDRESS || s.sinceLastFailure === null) return null;
	const delay = Math.min(MAX_DELAY_SECONDS, FIRST_DELAY_SECONDS * 2 ** (s.pairFailures - PER_ADDRESS));
	const left = delay - s.sinceLastFailure;
	return left > 0 ? `Too many sign-in attempts. Wait ${waitWords(left)} and try again.` : null;
}

export type Claim = { attemptId: string; blocked: null } | { attemptId: null; blocked: string };

/**
 * Checks the limit and, when the attempt may go ahead, records it as failed, atomically (one
 * transaction holding an advisory lock on the client). Call settleAttempt(id, true) when it
 * succeeds. Used by the password sign-in and by the sign-in link provider.
 */
export async function claimAttempt(email: string, client: string): Promise<Claim> {
	return db.transaction(async (tx) => {
		await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${'sign-in:' + client}, 0))`);
		const blocked = refusal(await attemptState(tx, email, client));
		if (blocked) return { attemptId: null, blocked };
		return { attemptId: await recordAttempt(tx, email, client, false), blocked: null };
	});
}

export function settleAttempt(attemptId: string, succeeded: boolean): Promise<void> {
	return succeeded ? settleAttemptRow(db, attemptId) : Promise.resolve();
}

/** Read-only: the refusal message if this address × client must wait now, else null. For a
 * check before work that records its attempt with noteAttempt() afterwards. */
export async function signInBlocked(email: string, client: string): Promise<string | null> {
	return refusal(await attemptState(db, email, client));
}

/** Records an attempt that was not claimed with claimAttempt(). */
export async function noteAttempt(email: string, client: string, succeeded: boolean): Promise<void> {
	await recordAttempt(db, email, client, succeeded);
}
