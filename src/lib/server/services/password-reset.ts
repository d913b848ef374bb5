// "Forgot password": a single-use link by e-mail. The answer never says whether the address
// has an account; the link expires in an hour and works once.
import { and, eq, gt, isNull, sql } from 'drizzle-orm';
import type { Db } from '../db/client';
import { passwordResets, users } from '../db/schema';
import { hashPassword } from '../auth/passwords';
import { newSecret, sha256Hex } from '../auth/tokens';
import { queueMail } from '../mail/outbox';
import { passwordResetMail } from '../mail/messages';

/** Returns the queued mail's id, or null when the address has no account. */
export async function requestReset(db: Db, email: string, origin: string): Promise<string | null> {
	return db.transaction(async (tx) => {
		const [user] = await tx.select({ id: users.id }).from(users).where(eq(users.email, email)).limit(1);
		if (!user) return null;
		const secret = newSecret();
		await tx.insert(passwordResets).values({ userId: user.id, tokenHash: sha256Hex(secret), expiresAt: sql`now() + interval '1 hour'` });
		return queueMail(tx, { to: email, ...passwordResetMail(`${origin}/signin/reset/${secret}`) });
	});
}

export type ResetState = 'ok' | 'invalid';

export async function resetIsValid(db: Db, secret: string): Promise<boolean> {
	const [row] = await db
		.select({ id: passwordResets.id })
		.from(passwordResets)
		.where(and(eq(passwordResets.tokenHash, sha256Hex(secret)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, sql`now()`)))
		.limit(1);
	return Boolean(row);
}

/** Sets the new password and uses up the link, atomically. False when the link is not valid. */
export async function completeReset(db: Db, secret: string, password: string): Promise<boolean> {
	const hash = await hashPassword(password);
	return db.transaction(async (tx) => {
		const [row] = await tx
			.update(passwordResets)
			.set({ usedAt: sql`now()` })
			.where(and(eq(passwordResets.tokenHash, sha256Hex(secret)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, sql`now()`)))
			.returning({ userId: passwordResets.userId });
		if (!row) return false;
		await tx.update(users).set({ passwordHash: hash }).where(eq(users.id, row.userId));
		return true;
	});
}
