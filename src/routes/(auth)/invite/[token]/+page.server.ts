import { fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { signInVerified } from '../../../../auth';
import { fieldErrors, newPasswordSchema } from '$lib/schemas/auth';
import { setActiveShop } from '$lib/server/auth/actor';
import { INVITATION_MESSAGES, acceptInvitation, inspectInvitation } from '$lib/server/services/invitations';
import type { Actions, PageServerLoad } from './$types';

const accountSchema = z.object({
	name: z.string().trim().min(1, 'Enter your name.').max(120, 'At most 120 characters.'),
	password: newPasswordSchema
});

export const load: PageServerLoad = async ({ params }) => {
	const inv = await inspectInvitation(params.token);
	if (inv.state !== 'ok') return { invitation: null, problem: INVITATION_MESSAGES[inv.state] };
	return { invitation: inv, problem: null };
};

export const actions: Actions = {
	accept: async (event) => {
		const form = await event.request.clone().formData();
		const inv = await inspectInvitation(event.params.token);
		if (inv.state !== 'ok') return fail(410, { errors: { form: INVITATION_MESSAGES[inv.state] } });
		let account: z.infer<typeof accountSchema> | null = null;
		if (!inv.hasAccount) {
			const parsed = accountSchema.safeParse({ name: form.get('name'), password: form.get('password') });
			if (!parsed.success) return fail(400, { name: String(form.get('name') ?? '').slice(0, 120), errors: fieldErrors(parsed.error) });
			account = parsed.data;
		}
		const result = await acceptInvitation(event.params.token, account);
		if (result.state !== 'ok') {
			return fail(410, { errors: { form: result.state === 'needs_account' ? 'Choose a name and password.' : INVITATION_MESSAGES[result.state] } });
		}
		setActiveShop(event, result.shopId);
		if (!account) redirect(303, `/signin?joined=1&redirectTo=%2F`);
		// A new account, just made with the password chosen on this form: signed in at once.
		await signInVerified(event, { id: result.userId, email: result.email, name: account.name }, '/');
	}
};
