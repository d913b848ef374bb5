// "Forgot password": a single-use link by e-mail. The answer never says whether the address
// has an account: the form only stores a request (auth/mail-requests.ts), and this work runs
// afterwards. The link expires in an hour and works once; using it ends every session.
//
// Accounts, reset links and sessions are not shop-owned (no row-level security): the work runs
// on the app's client without a shop or system scope.
import { and, eq, gt, isNull, sql } from 'drizzle-orm';
import { db } from '../db';
import type { Conn, Tx } from '../db/scope';
import { passwordResets, users } from '../db/schema';
import { hashPassword } from '../auth/passwords';
import { endSessionsOf } from '../auth/sessions';
import { newSecret, sha256Hex } from '../auth/tokens';
import { queueMail } from '../mail/outbox';
import { passwordResetMail } from '../mail/messages';
import { passwordOwner } from './sign-in';

/** In the caller's transaction: a reset link for `email`, queued in the outbox. Returns the
 * queued mail's id, or null when the address has no account. */
export async function queueReset(tx: Tx, email: string, origin: string): Promise<string | null> {
	const [user] = await tx.select({ id: users.id }).from(users).where(eq(users.email, email)).limit(1);
	if (!user) return null;
	const secret = newSecret();
	await tx.insert(passwordResets).values({ userId: user.id, tokenHash: sha256Hex(secret), expiresAt: sql`now() + interval '1 hour'` });
	return queueMail(tx, { to: email, ...passwordResetMail(`${origin}/signin/reset/${secret}`) });
}

export type ResetState = 'ok' | 'invalid';

export async function resetIsValid(conn: Conn, secret: string): Promise<boolean> {
	const [row] = await conn
		.select({ id: passwordResets.id })
		.from(passwordResets)
		.where(and(eq(passwordResets.tokenHash, sha256Hex(secret)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, sql`now()`)))
		.limit(1);
	return Boolean(row);
}

/** For the reset page: does the link `secret` still work? */
export function resetLinkWorks(secret: string): Promise<boolean> {
	return resetIsValid(db, secret);
}

/** Sets the new password, uses up the link and ends every session of that person, atomically.
 * False when the link is not valid. */
export async function completeReset(secret: string, password: string): Promise<boolean> {
	const hash = await hashPassword(password);
	return db.transaction(async (tx) => {
		const [row] = await tx
			.update(passwordResets)
			.set({ usedAt: sql`now()` })
			.where(and(eq(passwordResets.tokenHash, sha256Hex(secret)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, sql`now()`)))
			.returning({ userId: passwordResets.userId });
		if (!row) return false;
		await tx.update(users).set({ passwordHash: hash }).where(eq(users.id, row.userId));
		await endSessionsOf(tx, row.userId);
		return true;
	});
}

export type PasswordChange = { ok: true; ended: number } | { ok: false; field: 'current'; message: string };

/**
 * A signed-in person changes their password: the current one must match. Every other session
 * of theirs ends in the same transaction; `keepSession` (the one making the change) stays.
 */
export async function changePassword(userId: string, current: string, next: string, keepSession: string | null): Promise<PasswordChange> {
	if (!(await passwordOwner({ userId }, current))) {
		return { ok: false, field: 'current', message: 'That is not your current password.' };
	}
	const hash = await hashPassword(next);
	return db.transaction(async (tx) => {
		await tx.update(users).set({ passwordHash: hash }).where(eq(users.id, userId));
		return { ok: true as const, ended: await endSessionsOf(tx, userId, keepSession) };
	});
}
