import { and, asc, eq, gt, isNull, or, sql } from 'drizzle-orm';
import type { Role } from '$lib/measurements';
import type { Conn } from '../db/scope';
import { apiTokens, memberships, shops, users } from '../db/schema';

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

/** The token behind a hash, if it is live, with its owner's current role in the token's shop. */
export async function liveTokenByHash(conn: Conn, tokenHash: string) {
	const [row] = await conn
		.select({
			id: apiTokens.id,
			shopId: apiTokens.shopId,
			userId: apiTokens.userId,
			tokenRole: apiTokens.role,
			memberRole: memberships.role,
			shopName: shops.name,
			shopSlug: shops.slug,
			email: users.email,
			name: users.name,
			expiresAt: apiTokens.expiresAt,
			revokedAt: apiTokens.revokedAt
		})
		.from(apiTokens)
		.innerJoin(users, eq(users.id, apiTokens.userId))
		.innerJoin(shops, eq(shops.id, apiTokens.shopId))
		.leftJoin(memberships, and(eq(memberships.shopId, apiTokens.shopId), eq(memberships.userId, apiTokens.userId)))
		.where(
			and(
				eq(apiTokens.tokenHash, tokenHash),
				isNull(apiTokens.revokedAt),
				or(isNull(apiTokens.expiresAt), gt(apiTokens.expiresAt, sql`now()`))
			)
		)
		.limit(1);
	return row ?? null;
}

export async function touchToken(conn: Conn, id: string) {
	// At most one write a minute per token: last-used is for people, not an access log.
	await conn
		.update(apiTokens)
		.set({ lastUsedAt: sql`now()` })
		.where(and(eq(apiTokens.id, id), or(isNull(apiTokens.lastUsedAt), sql`${apiTokens.lastUsedAt} < now() - interval '1 minute'`)));
}
