import { asc, eq, sql } from 'drizzle-orm';
import type { Role } from '$lib/measurements';
import type { Conn } from '../db/scope';
import { memberships, shops, users } from '../db/schema';

export interface ShopMembership {
	shopId: string;
	shopName: string;
	shopSlug: string;
	role: Role;
}

/** A user's shops. Runs under system scope: it looks across shops by design. */
export async function membershipsOf(conn: Conn, userId: string): Promise<ShopMembership[]> {
	return conn
		.select({ shopId: shops.id, shopName: shops.name, shopSlug: shops.slug, role: memberships.role })
		.from(memberships)
		.innerJoin(shops, eq(shops.id, memberships.shopId))
		.where(eq(memberships.userId, userId))
		.orderBy(asc(shops.name));
}

export async function userById(conn: Conn, userId: string) {
	const [u] = await conn
		.select({ id: users.id, email: users.email, name: users.name })
		.from(users)
		.where(eq(users.id, userId))
		.limit(1);
	return u ?? null;
}

export type LiveToken = {
	tokenId: string;
	shopId: string;
	userId: string;
	tokenRole: Role;
	/** The user's role in the token's shop now (a token of a former member is not live). */
	memberRole: Role;
	shopName: string;
	shopSlug: string;
	email: string;
	name: string | null;
};

/**
 * The token behind a hash, if it is live (not revoked, not expired, its user still a member of
 * its shop), with the owner's current role there; touches last_used_at at most once a minute.
 * One statement, lapmark_token_actor (drizzle/0005), which looks across shops for this lookup
 * only: no transaction and no system scope around it.
 */
export async function liveToken(conn: Conn, tokenHash: string): Promise<LiveToken | null> {
	const [row] = await conn.execute<LiveToken>(sql`select * from lapmark_token_actor(${tokenHash})`);
	return row ?? null;
}

/** The shop's name, address on this site and units, as its settings page shows them. */
export async function shopProfile(conn: Conn, shopId: string) {
	const [shop] = await conn
		.select({ name: shops.name, slug: shops.slug, lengthUnit: shops.lengthUnit, distanceUnit: shops.distanceUnit, currency: shops.currency, createdAt: shops.createdAt })
		.from(shops)
		.where(eq(shops.id, shopId));
	return shop;
}
