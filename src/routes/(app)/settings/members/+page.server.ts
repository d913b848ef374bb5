import { error, fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { changeRoleSchema, idSchema, inviteSchema, memberSchema } from '$lib/schemas/members';
import { requireRole } from '$lib/server/auth/guards';
import { newSecret, sha256Hex } from '$lib/server/auth/tokens';
import { endSessionsOf } from '$lib/server/auth/sessions';
import { db } from '$lib/server/db';
import { publicOrigin } from '$lib/server/env';
import { withShop } from '$lib/server/db/scope';
import { deliverQueued, queueMail } from '$lib/server/mail';
import { invitationMail } from '$lib/server/mail/messages';
import { audit } from '$lib/server/queries/audit';
import {
	createInvitation,
	listMembers,
	memberRole,
	otherOwners,
	pendingInvitations,
	removeMember,
	revokeInvitation,
	setRole
} from '$lib/server/queries/members';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'owner');
	return withShop(db, actor.shopId, async (tx) => ({
		members: await listMembers(tx, actor.shopId),
		invitations: await pendingInvitations(tx, actor.shopId),
		me: actor.userId
	}));
};

const LAST_OWNER = 'The shop must keep at least one owner. Make someone else an owner first.';

export const actions: Actions = {
	invite: async (event) => {
		const actor = requireRole(event, 'owner');
		const form = Object.fromEntries(await event.request.formData());
		const parsed = inviteSchema.safeParse(form);
		if (!parsed.success) return fail(400, { action: 'invite', values: { email: String(form.email ?? '').slice(0, 254), role: String(form.role ?? '') }, errors: fieldErrors(parsed.error) });
		const { email, role } = parsed.data;
		const secret = newSecret();
		const url = `${publicOrigin}/invite/${secret}`;
		const mailId = await withShop(db, actor.shopId, async (tx) => {
			const inv = await createInvitation(tx, { shopId: actor.shopId, email, role, tokenHash: sha256Hex(secret), invitedBy: actor.userId });
			await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'invitation', entityId: inv.id, action: 'create', after: { email, role } });
			return queueMail(tx, { to: email, shopId: actor.shopId, ...invitationMail(actor.shopName, role, url) });
		});
		const sent = await deliverQueued([mailId]);
		return {
			action: 'invite',
			ok: true,
			message: sent.failed
				? `Invitation for ${email} saved, but the e-mail could not be sent yet (${sent.errors[0]}). It will be retried.`
				: `Invitation sent to ${email}.`
		};
	},
	role: async (event) => {
		const actor = requireRole(event, 'owner');
		const parsed = changeRoleSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { action: 'role', errors: fieldErrors(parsed.error) });
		const { userId, role } = parsed.data;
		return withShop(db, actor.shopId, async (tx) => {
			const before = await memberRole(tx, actor.shopId, userId);
			if (!before) error(404, 'No such member.');
			if (before === 'owner' && role !== 'owner' && (await otherOwners(tx, actor.shopId, userId)) === 0) {
				return fail(409, { action: 'role', errors: { form: LAST_OWNER } });
			}
			await setRole(tx, actor.shopId, userId, role);
			await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'membership', entityId: userId, action: 'update', before: { role: before }, after: { role } });
			return { action: 'role', ok: true, message: 'Role changed.' };
		});
	},
	remove: async (event) => {
		const actor = requireRole(event, 'owner');
		const parsed = memberSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { action: 'remove', errors: fieldErrors(parsed.error) });
		const { userId } = parsed.data;
		return withShop(db, actor.shopId, async (tx) => {
			const before = await memberRole(tx, actor.shopId, userId);
			if (!before) error(404, 'No such member.');
			if (before === 'owner' && (await otherOwners(tx, actor.shopId, userId)) === 0) {
				return fail(409, { action: 'remove', errors: { form: LAST_OWNER } });
			}
			await removeMember(tx, actor.shopId, userId);
			// Every session of the person ends at once, in this transaction (they sign in again
			// for any other shop they belong to). A role change needs no such step: the role is
			// read from the database on every request, so it applies from the next one.
			await endSessionsOf(tx, userId);
			await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'membership', entityId: userId, action: 'delete', before: { role: before } });
			return { action: 'remove', ok: true, message: 'Member removed.' };
		});
	},
	revokeInvite: async (event) => {
		const actor = requireRole(event, 'owner');
		const parsed = idSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) error(404, 'No such invitation.');
		return withShop(db, actor.shopId, async (tx) => {
			const inv = await revokeInvitation(tx, actor.shopId, parsed.data.id);
			if (!inv) error(404, 'No such invitation.');
			await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'invitation', entityId: inv.id, action: 'revoke', before: { email: inv.email } });
			return { action: 'revokeInvite', ok: true, message: `Invitation for ${inv.email} withdrawn.` };
		});
	}
};
