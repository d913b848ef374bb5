// Sign-in rate limit: failed attempts per address and per client in a sliding window, counted
// in the database so every app server sees the same attempts. A shop's machines often share
// one address behind a router, so the per-client limit is higher than the per-address one.
import { db } from '../db';
import { env } from '../env';
import { SIGN_IN_WINDOW_MINUTES, failedAttemptsSince, recordAttempt } from '../queries/sign-in';

export const PER_ADDRESS = 10;

export async function signInBlocked(email: string, client: string): Promise<string | null> {
	const [byEmail, byClient] = await Promise.all([
		failedAttemptsSince(db, { email }),
		failedAttemptsSince(db, { client })
	]);
	if (byEmail >= PER_ADDRESS || byClient >= env.LAPMARK_SIGNIN_CLIENT_LIMIT) {
		return `Too many sign-in attempts. Wait ${SIGN_IN_WINDOW_MINUTES} minutes and try again.`;
	}
	return null;
}

export function noteAttempt(email: string, client: string, succeeded: boolean) {
	return recordAttempt(db, email, client, succeeded);
}
