// Who is asking: built once per request from the session cookie or a Bearer token.
import type { RequestEvent } from '@sveltejs/kit';
import type { Role } from '$lib/measurements';
import { db } from '../db';
import { withSystem } from '../db/scope';
import { liveToken, membershipsOf, userById, type ShopMembership } from '../queries/memberships';
import { lowerRole } from './access';
import { sessionIsLive } from './sessions';
import { looksLikeApiToken, sha256Hex } from './tokens';

export interface Actor {
	userId: string;
	email: string;
	name: string | null;
	/** The active shop and the role held there; null when the user belongs to no shop. */
	shopId: string | null;
	shopName: string | null;
	role: Role | null;
	via: 'session' | 'token';
	/** The server-side session behind the cookie (null for a token). */
	sessionId: string | null;
	memberships: ShopMembership[];
}

export const ACTIVE_SHOP_COOKIE = 'lapmark_shop';

/** Makes `shopId` the shop the person works in from the next request on (for a year). */
export function setActiveShop(event: RequestEvent, shopId: string): void {
	event.cookies.set(ACTIVE_SHOP_COOKIE, shopId, { path: '/', httpOnly: true, sameSite: 'lax', secure: event.url.protocol === 'https:', maxAge: 365 * 24 * 3600 });
}

export type BearerResult = { actor: Actor } | { error: string } | null;

/** Resolve `Authorization: Bearer lmk_…`. Null when no bearer header was sent. */
export async function actorFromBearer(header: string | null): Promise<BearerResult> {
	if (!header) return null;
	const m = /^Bearer\s+(\S+)$/i.exec(header.trim());
	if (!m) return { error: 'The Authorization header must be "Bearer <token>".' };
	const token = m[1];
	if (!looksLikeApiToken(token)) return { error: 'That is not a Lapmark API token.' };
	// One statement on its own: no transaction, no system scope (see lapmark_token_actor).
	const row = await liveToken(db, sha256Hex(token));
	if (!row) return { error: 'The token is unknown, expired or revoked.' };
	const role = lowerRole(row.tokenRole, row.memberRole);
	return {
		actor: {
			userId: row.userId,
			email: row.email,
			name: row.name,
			shopId: row.shopId,
			shopName: row.shopName,
			role,
			via: 'token' as const,
			sessionId: null,
			memberships: [{ shopId: row.shopId, shopName: row.shopName, shopSlug: row.shopSlug, role }]
		}
	};
}

/** Resolve the signed-in user and the active shop (remembered in a cookie, checked every time).
 * Null when the session behind the cookie has ended (signed out, revoked, idle or too old). */
export async function actorFromSession(event: RequestEvent, userId: string, sessionId: string | null | undefined): Promise<Actor | null> {
	// A cookie without a server-side session (made before sessions were kept) is not honoured.
	if (!sessionId) return null;
	return withSystem(db, async (tx) => {
		// All three at once: postgres.js pipelines them on the transaction's connection, so the
		// session check adds no round trip.
		const [live, user, shops] = await Promise.all([sessionIsLive(tx, sessionId, userId), userById(tx, userId), membershipsOf(tx, userId)]);
		if (!live || !user) return null;
		const wanted = event.cookies.get(ACTIVE_SHOP_COOKIE);
		const active = shops.find((s) => s.shopId === wanted) ?? shops[0] ?? null;
		return {
			userId: user.id,
			email: user.email,
			name: user.name,
			shopId: active?.shopId ?? null,
			shopName: active?.shopName ?? null,
			role: active?.role ?? null,
			via: 'session' as const,
			sessionId,
			memberships: shops
		};
	});
}
