// Accepting an invitation: the link proves the address, so it may create the account.
// Runs under system scope (the person is not yet a member of the shop) and locks the
// invitation row so a link cannot be used twice.
import { eq, sql } from 'drizzle-orm';
import { inSystem } from '../db';
import type { Tx } from '../db/scope';
import { invitations, memberships, shops, users } from '../db/schema';
import { hashPassword } from '../auth/passwords';
import { sha256Hex } from '../auth/tokens';
import { audit } from '../queries/audit';
import { createUser } from './accounts';

export type InvitationState = 'ok' | 'unknown' | 'expired' | 'used' | 'revoked';

export const INVITATION_MESSAGES: Record<Exclude<InvitationState, 'ok'>, string> = {
	unknown: 'This invitation link is not valid. Check that you opened the whole link.',
	expired: 'This invitation has expired. Ask the shop owner for a new one.',
	used: 'This invitation was already used. Sign in instead.',
	revoked: 'This invitation was withdrawn by the shop owner.'
};

async function find(tx: Tx, secret: string, lock: boolean) {
	const rows = await tx.execute<{
		id: string; shop_id: string; email: string; role: string; expires_at: Date; accepted_at: Date | null; revoked_at: Date | null; shop_name: string; expired: boolean;
	}>(sql`
		select i.id, i.shop_id, i.email, i.role, i.expires_at, i.accepted_at, i.revoked_at, s.name as shop_name,
			i.expires_at <= now() as expired
		from invitations i join shops s on s.id = i.shop_id
		where i.token_hash = ${sha256Hex(secret)}
		${lock ? sql`for update of i` : sql``}`);
	const inv = rows[0];
	if (!inv) return { state: 'unknown' as const };
	if (inv.revoked_at) return { state: 'revoked' as const };
	if (inv.accepted_at) return { state: 'used' as const };
	if (inv.expired) return { state: 'expired' as const };
	const [user] = await tx.select({ id: users.id }).from(users).where(eq(users.email, inv.email)).limit(1);
	return { state: 'ok' as const, inv, userId: user?.id ?? null };
}

export async function inspectInvitation(secret: string) {
	return inSystem(async (tx) => {
		const r = await find(tx, secret, false);
		if (r.state !== 'ok') return { state: r.state };
		return { state: r.state, email: r.inv.email, role: r.inv.role, shopName: r.inv.shop_name, hasAccount: Boolean(r.userId) };
	});
}

/** Accept: creates the account when there is none (name and password required then). */
export async function acceptInvitation(secret: string, account: { name: string; password: string } | null) {
	const hash = account ? await hashPassword(account.password) : null;
	return inSystem(async (tx) => {
		const r = await find(tx, secret, true);
		if (r.state !== 'ok') return { state: r.state };
		let userId = r.userId;
		if (!userId) {
			if (!account || !hash) return { state: 'needs_account' as const };
			userId = await createUser(tx, { email: r.inv.email, name: account.name, passwordHash: hash, emailVerified: new Date(), via: 'invitation' });
		}
		await tx
			.insert(memberships)
			.values({ shopId: r.inv.shop_id, userId, role: r.inv.role as never })
			.onConflictDoNothing();
		await tx.update(invitations).set({ acceptedAt: sql`now()` }).where(eq(invitations.id, r.inv.id));
		await audit(tx, r.inv.shop_id, { userId, label: r.inv.email }, { entity: 'membership', entityId: userId, action: 'create', after: { role: r.inv.role, via: 'invitation' } });
		const [shop] = await tx.select({ id: shops.id }).from(shops).where(eq(shops.id, r.inv.shop_id));
		return { state: 'ok' as const, email: r.inv.email, shopId: shop.id, userId };
	});
}
