import { error, fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { changeRoleSchema, idSchema, inviteSchema, memberSchema } from '$lib/schemas/members';
import { requireRole } from '$lib/server/auth/guards';
import { orError } from '$lib/server/http';
import { changeMemberRole, inviteMember, membersOfShop, removeMemberFromShop, withdrawInvitation } from '$lib/server/services/members';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'owner');
	return { ...(await membersOfShop(actor)), me: actor.userId };
};

const LAST_OWNER = 'The shop must keep at least one owner. Make someone else an owner first.';

export const actions: Actions = {
	invite: async (event) => {
		const actor = requireRole(event, 'owner');
		const form = Object.fromEntries(await event.request.formData());
		const parsed = inviteSchema.safeParse(form);
		if (!parsed.success) return fail(400, { action: 'invite', values: { email: String(form.email ?? '').slice(0, 254), role: String(form.role ?? '') }, errors: fieldErrors(parsed.error) });
		const { email, role } = parsed.data;
		const { failed, refused } = await inviteMember(actor, email, role);
		if (refused) return fail(409, { action: 'invite', values: { email, role }, errors: { email: refused } });
		return {
			action: 'invite',
			ok: true,
			message: failed ? `Invitation for ${email} saved, but the e-mail could not be sent yet (${failed}). It will be retried.` : `Invitation sent to ${email}.`
		};
	},
	role: async (event) => {
		const actor = requireRole(event, 'owner');
		const parsed = changeRoleSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { action: 'role', errors: fieldErrors(parsed.error) });
		const { userId, role } = parsed.data;
		if ((await orError(() => changeMemberRole(actor, userId, role))) === 'last_owner') return fail(409, { action: 'role', errors: { form: LAST_OWNER } });
		return { action: 'role', ok: true, message: 'Role changed.' };
	},
	remove: async (event) => {
		const actor = requireRole(event, 'owner');
		const parsed = memberSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { action: 'remove', errors: fieldErrors(parsed.error) });
		if ((await orError(() => removeMemberFromShop(actor, parsed.data.userId))) === 'last_owner') return fail(409, { action: 'remove', errors: { form: LAST_OWNER } });
		return { action: 'remove', ok: true, message: 'Member removed.' };
	},
	revokeInvite: async (event) => {
		const actor = requireRole(event, 'owner');
		const parsed = idSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) error(404, 'No such invitation.');
		const inv = await orError(() => withdrawInvitation(actor, parsed.data.id));
		return { action: 'revokeInvite', ok: true, message: `Invitation for ${inv.email} withdrawn.` };
	}
};
