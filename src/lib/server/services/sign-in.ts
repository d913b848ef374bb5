// Password sign-in. The one place a password is checked against an account: `passwordOwner`
// finds the person and compares the hash, once. The sign-in page's action calls it (through
// `signInWithPassword`, counted against the rate limit) and then hands the person it returned to
// Auth.js (`signInVerified` in src/auth.ts), whose Credentials `authorize` checks nothing itself:
// it accepts only the person verified here in the same request. The password change in the
// settings checks the current password here too.
import { db } from '../db';
import { verifyPassword } from '../auth/passwords';
import { claimAttempt, settleAttempt } from '../auth/rate-limit';
import { passwordHolder } from '../queries/sign-in';

/** A person whose password was just checked. */
export interface VerifiedUser {
	id: string;
	email: string;
	name: string | null;
}

/**
 * The person `by` names when `password` is theirs, else null. One lookup and one hash compare;
 * an unknown address (or an account without a password yet) is compared against a fixed hash,
 * so it takes as long as a known one.
 */
export async function passwordOwner(by: { email: string } | { userId: string }, password: string): Promise<VerifiedUser | null> {
	// Users are not shop-owned (no row-level security): the plain client, as the limit's rows.
	const user = await passwordHolder(db, by);
	const matches = await verifyPassword(password, user?.hash);
	return matches && user?.hash ? { id: user.id, email: user.email, name: user.name } : null;
}

export type PasswordSignIn = { state: 'ok'; user: VerifiedUser } | { state: 'wrong' } | { state: 'blocked'; message: string };

/** A password sign-in attempt from `client`: counted against the limit before the password is
 * checked (so parallel guesses cannot slip past it), settled as a success when it matches. */
export async function signInWithPassword(email: string, password: string, client: string): Promise<PasswordSignIn> {
	const claim = await claimAttempt(email, client);
	if (claim.blocked !== null) return { state: 'blocked', message: claim.blocked };
	const user = await passwordOwner({ email }, password);
	await settleAttempt(claim.attemptId, user !== null);
	return user ? { state: 'ok', user } : { state: 'wrong' };
}
