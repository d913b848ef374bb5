// Where accounts and shops come into being. `createUser` is the ONLY place a row of `user` is
// inserted: the shop sign-up, the operator's `npm run shop:create` and the acceptance of an
// invitation all call it, so "no account except through an invitation or a shop sign-up" holds
// by construction (grep for `insert(users)` to check). Free of SvelteKit imports: scripts use it.
import { eq, sql } from 'drizzle-orm';
import type { Tx } from '../db/scope';
import { memberships, passwordResets, shops, users } from '../db/schema';
import { newSecret, sha256Hex } from '../auth/tokens';
import { audit } from '../queries/audit';
import type { Currency, ShopDistanceUnit, ShopLengthUnit } from '../../shop-settings';

export type AccountOrigin = 'signup' | 'operator' | 'invitation';

export interface NewUser {
	email: string;
	name: string | null;
	/** Null: the person sets a password through a one-time link (operator-created owners). */
	passwordHash: string | null;
	/** When the address was proven (a sign-up link, an invitation link); null when not yet. */
	emailVerified: Date | null;
	via: AccountOrigin;
}

/** Creates one user. Run it inside the caller's system-scoped transaction. */
export async function createUser(tx: Tx, user: NewUser): Promise<string> {
	const [row] = await tx
		.insert(users)
		.values({ email: user.email.trim().toLowerCase(), name: user.name, passwordHash: user.passwordHash, emailVerified: user.emailVerified })
		.returning({ id: users.id });
	return row.id;
}

export async function userIdByEmail(tx: Tx, email: string): Promise<string | null> {
	const [row] = await tx.select({ id: users.id }).from(users).where(eq(users.email, email.trim().toLowerCase())).limit(1);
	return row?.id ?? null;
}

/** A URL-safe slug from a shop's name ("Harbour Head Works" → "harbour-head-works"). */
export function slugFromName(name: string): string {
	const base = name
		.normalize('NFKD')
		.replace(/[\u0300-\u036f]/g, '')
		.toLowerCase()
		.replace(/[^a-z0-9]+/g, '-')
		.replace(/^-+|-+$/g, '')
		.slice(0, 40)
		.replace(/-+$/g, '');
	return base.length >= 2 ? base : `shop${base ? `-${base}` : ''}`;
}

async function freeSlug(tx: Tx, name: string): Promise<string> {
	const base = slugFromName(name);
	const taken = await tx.execute<{ slug: string }>(sql`select slug from shops where slug = ${base} or slug like ${`${base}-%`}`);
	const used = new Set(taken.map((r) => r.slug));
	if (!used.has(base)) return base;
	for (let n = 2; n < 1000; n++) if (!used.has(`${base}-${n}`)) return `${base}-${n}`;
	return `${base}-${newSecret(4).toLowerCase().replace(/[^a-z0-9]/g, 'x')}`;
}

export interface NewShop {
	name: string;
	lengthUnit: ShopLengthUnit;
	distanceUnit: ShopDistanceUnit;
	currency: Currency;
}

/** Creates a shop with `ownerId` as its owner, and says so in the shop's audit log. */
export async function createShopWithOwner(tx: Tx, shop: NewShop, owner: { userId: string; label: string }, via: AccountOrigin) {
	const slug = await freeSlug(tx, shop.name);
	const [row] = await tx
		.insert(shops)
		.values({ name: shop.name.trim(), slug, lengthUnit: shop.lengthUnit, distanceUnit: shop.distanceUnit, currency: shop.currency })
		.returning();
	await tx.insert(memberships).values({ shopId: row.id, userId: owner.userId, role: 'owner' });
	const who = { userId: owner.userId, label: owner.label };
	await audit(tx, row.id, who, { entity: 'shop', entityId: row.id, action: 'create', after: { name: row.name, lengthUnit: row.lengthUnit, distanceUnit: row.distanceUnit, currency: row.currency, via } });
	await audit(tx, row.id, who, { entity: 'membership', entityId: owner.userId, action: 'create', after: { role: 'owner', via } });
	return row;
}

/**
 * A one-time link to choose a password, through the password-reset page
 * (/signin/reset/<secret>, services/password-reset.ts checks and uses it up).
 */
export async function passwordLink(tx: Tx, userId: string, origin: string, hours: number): Promise<string> {
	const secret = newSecret();
	await tx.insert(passwordResets).values({ userId, tokenHash: sha256Hex(secret), expiresAt: sql`now() + make_interval(hours => ${hours})` });
	return `${origin.replace(/\/+$/, '')}/signin/reset/${secret}`;
}
