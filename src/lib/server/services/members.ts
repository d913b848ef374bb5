// A shop's people (the owner's members page): the members and open invitations, inviting by
// e-mail, changing a role, removing a member, withdrawing an invitation. Each step runs in one
// transaction scoped to the owner's shop and is written to the shop's audit log in it.
import type { Role } from '$lib/measurements';
import type { ShopActor } from '../auth/guards';
import { endSessionsOf } from '../auth/sessions';
import { newSecret, sha256Hex } from '../auth/tokens';
import { inShop } from '../db';
import type { Tx } from '../db/scope';
import { publicOrigin } from '../env';
import { notFound } from '../errors';
import { deliverQueued, queueMail } from '../mail';
import { invitationMail } from '../mail/messages';
import { audit, type AuditWho } from '../queries/audit';
import {
	createInvitation,
	listMembers,
	memberRole,
	memberRoleByEmail,
	otherOwners,
	pendingInvitations,
	removeMember,
	revokeInvitation,
	setRole
} from '../queries/members';

type Owner = Pick<ShopActor, 'shopId' | 'shopName' | 'userId' | 'email'>;

const who = (actor: Owner): AuditWho => ({ userId: actor.userId, label: actor.email });

/** The shop's members and its invitations still open. */
export function membersOfShop(actor: Owner) {
	return inShop(actor.shopId, async (tx) => ({
		members: await listMembers(tx, actor.shopId),
		invitations: await pendingInvitations(tx, actor.shopId)
	}));
}

/** Invites `email` with `role` and mails the link after the commit. `failed`: why the mail
 * could not be sent yet (the outbox retries it), or null when it went. Someone already a member,
 * or already invited and not yet answered, is not invited again: `refused` says why. */
export async function inviteMember(actor: Owner, email: string, role: Role): Promise<{ failed: string | null; refused?: string }> {
	const secret = newSecret();
	const url = `${publicOrigin}/invite/${secret}`;
	const outcome = await inShop(actor.shopId, async (tx) => {
		const member = await memberRoleByEmail(tx, actor.shopId, email);
		if (member) return { refused: `${email} is already a member of this shop (${member}). Change their role in the list below instead.` };
		const open = (await pendingInvitations(tx, actor.shopId)).find((i) => i.email.toLowerCase() === email.toLowerCase());
		if (open) return { refused: `${email} was already invited (${open.role}) and has not answered yet. Withdraw that invitation below to send a new one.` };
		const inv = await createInvitation(tx, { shopId: actor.shopId, email, role, tokenHash: sha256Hex(secret), invitedBy: actor.userId });
		await audit(tx, actor.shopId, who(actor), { entity: 'invitation', entityId: inv.id, action: 'create', after: { email, role } });
		return { mailId: await queueMail(tx, { to: email, shopId: actor.shopId, ...invitationMail(actor.shopName, role, url) }) };
	});
	if ('refused' in outcome) return { failed: null, refused: outcome.refused };
	const sent = await deliverQueued([outcome.mailId]);
	return { failed: sent.failed ? sent.errors[0] : null };
}

/** What a change to a membership can meet besides success: the shop's last owner. */
export type MemberChange = 'ok' | 'last_owner';

/**
 * In the owner's shop: the member's role now (404 when not a member), and whether the change
 * would leave the shop without an owner (the other owners are locked until the commit).
 */
async function changing(tx: Tx, actor: Owner, userId: string, staysOwner: boolean) {
	const before = await memberRole(tx, actor.shopId, userId);
	if (!before) throw notFound('No such member.');
	const lastOwner = before === 'owner' && !staysOwner && (await otherOwners(tx, actor.shopId, userId)) === 0;
	return { before, lastOwner };
}

export function changeMemberRole(actor: Owner, userId: string, role: Role): Promise<MemberChange> {
	return inShop(actor.shopId, async (tx) => {
		const { before, lastOwner } = await changing(tx, actor, userId, role === 'owner');
		if (lastOwner) return 'last_owner';
		await setRole(tx, actor.shopId, userId, role);
		await audit(tx, actor.shopId, who(actor), { entity: 'membership', entityId: userId, action: 'update', before: { role: before }, after: { role } });
		return 'ok';
	});
}

export function removeMemberFromShop(actor: Owner, userId: string): Promise<MemberChange> {
	return inShop(actor.shopId, async (tx) => {
		const { before, lastOwner } = await changing(tx, actor, userId, false);
		if (lastOwner) return 'last_owner';
		await removeMember(tx, actor.shopId, userId);
		// Every session of the person ends at once, in this transaction (they sign in again
		// for any other shop they belong to). A role change needs no such step: the role is
		// read from the database on every request, so it applies from the next one.
		await endSessionsOf(tx, userId);
		await audit(tx, actor.shopId, who(actor), { entity: 'membership', entityId: userId, action: 'delete', before: { role: before } });
		return 'ok';
	});
}

/** Withdraws an open invitation (404 when there is none of that id); returns its address. */
export function withdrawInvitation(actor: Owner, id: string): Promise<{ email: string }> {
	return inShop(actor.shopId, async (tx) => {
		const inv = await revokeInvitation(tx, actor.shopId, id);
		if (!inv) throw notFound('No such invitation.');
		await audit(tx, actor.shopId, who(actor), { entity: 'invitation', entityId: inv.id, action: 'revoke', before: { email: inv.email } });
		return { email: inv.email };
	});
}
