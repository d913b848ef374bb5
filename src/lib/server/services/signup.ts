// Public shop sign-up. The form stores a pending sign-up (hashes only) and mails a link; only
// the link, opened together with the password chosen, creates the user, the shop and the
// owner's membership, in one transaction. An address that already has an account gets a note
// instead, and the form's answer is the same, so the form does not tell who has an account.
import { and, eq, isNull, sql } from 'drizzle-orm';
import { inSystem } from '../db';
import type { Tx } from '../db/scope';
import { shopSignups } from '../db/schema';
import { publicOrigin } from '../env';
import { hashPassword, verifyPassword } from '../auth/passwords';
import { newSecret, sha256Hex } from '../auth/tokens';
import { deliverQueued, queueMail } from '../mail';
import { signupConfirmMail, signupExistingMail } from '../mail/shop-messages';
import type { SignupInput } from '../../schemas/shop';
import { createShopWithOwner, createUser, userIdByEmail } from './accounts';

/** How long a sign-up link works. */
export const SIGNUP_LINK_HOURS = 24;

/** Queues the confirmation (or, for a known address, the note) and sends it after the commit,
 * without waiting: a send that fails is retried from the outbox. */
export async function requestSignup(input: SignupInput): Promise<void> {
	const mailId = await queueSignupMail(input, publicOrigin);
	void deliverQueued([mailId]).catch((e) => console.error('[signup] mail not sent yet', e));
}

/** Queues the confirmation (or, for a known address, the note); returns the mail's id. */
async function queueSignupMail(input: SignupInput, origin: string): Promise<string> {
	// Hashed whether or not the address is known, so both answers take as long.
	const passwordHash = await hashPassword(input.password);
	const base = origin.replace(/\/+$/, '');
	return inSystem(async (tx) => {
		// Sign-ups never confirmed are of no use a week after their link expired.
		await tx.delete(shopSignups).where(and(isNull(shopSignups.confirmedAt), sql`${shopSignups.expiresAt} < now() - interval '7 days'`));
		if (await userIdByEmail(tx, input.email)) {
			return queueMail(tx, { to: input.email, ...signupExistingMail(`${base}/signin`, `${base}/signin/forgot`) });
		}
		const secret = newSecret();
		await tx.insert(shopSignups).values({
			email: input.email,
			ownerName: input.ownerName,
			passwordHash,
			shopName: input.shopName,
			lengthUnit: input.lengthUnit,
			distanceUnit: input.distanceUnit,
			currency: input.currency,
			tokenHash: sha256Hex(secret),
			expiresAt: sql`now() + make_interval(hours => ${SIGNUP_LINK_HOURS})`
		});
		return queueMail(tx, { to: input.email, ...signupConfirmMail(input.shopName, `${base}/signup/confirm/${secret}`, SIGNUP_LINK_HOURS) });
	});
}

export type SignupState = 'ok' | 'unknown' | 'expired' | 'used' | 'taken';

export const SIGNUP_MESSAGES: Record<Exclude<SignupState, 'ok'>, string> = {
	unknown: 'This sign-up link is not valid. Check that you opened the whole link, or sign up again.',
	expired: `This sign-up link has expired (links work for ${SIGNUP_LINK_HOURS} hours). Sign up again.`,
	used: 'This sign-up link was already used: your shop exists. Sign in.',
	taken: 'This address already has a Lapmark account. Sign in with it instead.'
};

type Found = { state: Exclude<SignupState, 'ok'> } | { state: 'ok'; row: typeof shopSignups.$inferSelect };

async function find(tx: Tx, secret: string, lock: boolean): Promise<Found> {
	const q = tx
		.select()
		.from(shopSignups)
		.where(eq(shopSignups.tokenHash, sha256Hex(secret)))
		.limit(1);
	const [row] = lock ? await q.for('update') : await q;
	if (!row) return { state: 'unknown' };
	if (row.confirmedAt) return { state: 'used' };
	if (row.expiresAt.getTime() <= Date.now()) return { state: 'expired' };
	if (await userIdByEmail(tx, row.email)) return { state: 'taken' };
	return { state: 'ok', row };
}

export async function inspectSignup(secret: string) {
	return inSystem(async (tx) => {
		const r = await find(tx, secret, false);
		if (r.state !== 'ok') return { state: r.state };
		return { state: r.state, email: r.row.email, ownerName: r.row.ownerName, shopName: r.row.shopName };
	});
}

/**
 * Finishes a sign-up: the password typed must be the one chosen on the form (so a link alone,
 * say a forwarded mail, does not sign anybody in). Creates the user, the shop and the owner's
 * membership and uses up the link, atomically.
 */
export async function confirmSignup(secret: string, password: string) {
	return inSystem(async (tx) => {
		const r = await find(tx, secret, true);
		if (r.state !== 'ok') return { state: r.state } as const;
		if (!(await verifyPassword(password, r.row.passwordHash))) return { state: 'wrong_password', email: r.row.email } as const;
		const userId = await createUser(tx, { email: r.row.email, name: r.row.ownerName, passwordHash: r.row.passwordHash, emailVerified: new Date(), via: 'signup' });
		const shop = await createShopWithOwner(
			tx,
			{ name: r.row.shopName, lengthUnit: r.row.lengthUnit, distanceUnit: r.row.distanceUnit, currency: r.row.currency },
			{ userId, label: r.row.email },
			'signup'
		);
		await tx
			.update(shopSignups)
			.set({ confirmedAt: sql`now()`, shopId: shop.id, passwordHash: '' }) // the user row keeps the hash now
			.where(and(eq(shopSignups.id, r.row.id), isNull(shopSignups.confirmedAt)));
		// The other pending sign-ups of this address can never be used now: drop them (with their hashes).
		await tx.delete(shopSignups).where(and(eq(shopSignups.email, r.row.email), isNull(shopSignups.confirmedAt)));
		return { state: 'ok', email: r.row.email, shopId: shop.id, userId } as const;
	});
}

/** Is there no shop at all yet (a fresh install)? */
export async function noShopsYet(): Promise<boolean> {
	const rows = await inSystem((tx) => tx.execute(sql`select 1 from shops limit 1`));
	return rows.length === 0;
}
