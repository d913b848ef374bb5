// API tokens of a shop (the tokens page): listed, made and revoked in the shop's scope, each
// change written to its audit log. A token is shown once, when made; only its hash is stored.
import type { ShopActor } from '../auth/guards';
import { newApiToken, sha256Hex, tokenDisplayPrefix } from '../auth/tokens';
import { inShop } from '../db';
import { notFound } from '../errors';
import { audit } from '../queries/audit';
import { insertToken, listTokens, revokeToken } from '../queries/tokens';

type Holder = Pick<ShopActor, 'shopId' | 'userId' | 'email' | 'role'>;

/** The tokens `actor` may see: an owner every token of the shop, anybody else their own. */
export async function visibleTokens(actor: Holder) {
	const tokens = await inShop(actor.shopId, (tx) => listTokens(tx, actor.shopId));
	return actor.role === 'owner' ? tokens : tokens.filter((t) => t.userId === actor.userId);
}

/** A new token of `actor`'s with their role, valid `days` days (0: until revoked); the secret
 * is in the answer only. */
export async function createApiToken(actor: Holder, name: string, days: number) {
	const token = newApiToken();
	const expiresAt = days ? new Date(Date.now() + days * 86_400_000) : null;
	const row = await inShop(actor.shopId, async (tx) => {
		const t = await insertToken(tx, { shopId: actor.shopId, userId: actor.userId, name, prefix: tokenDisplayPrefix(token), tokenHash: sha256Hex(token), role: actor.role, expiresAt });
		await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'api_token', entityId: t.id, action: 'create', after: { name: t.name, prefix: t.prefix, role: t.role, expiresAt } });
		return t;
	});
	return { ...row, token };
}

/** Revokes a token `actor` may see (404 otherwise, as for one that does not exist); null when
 * it was already revoked. */
export function revokeApiToken(actor: Holder, id: string): Promise<{ name: string } | null> {
	return inShop(actor.shopId, async (tx) => {
		const mine = (await listTokens(tx, actor.shopId)).find((t) => t.id === id);
		if (!mine || (actor.role !== 'owner' && mine.userId !== actor.userId)) throw notFound('No such token.');
		const t = await revokeToken(tx, actor.shopId, id);
		if (!t) return null;
		await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'api_token', entityId: t.id, action: 'revoke', before: { name: t.name, prefix: t.prefix } });
		return { name: t.name };
	});
}
