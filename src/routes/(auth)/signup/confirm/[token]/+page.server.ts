import { fail } from '@sveltejs/kit';
import { signInVerified } from '../../../../../auth';
import { passwordSchema } from '$lib/schemas/auth';
import { setActiveShop } from '$lib/server/auth/actor';
import { noteAttempt, signInBlocked } from '$lib/server/auth/rate-limit';
import { SIGNUP_MESSAGES, confirmSignup, inspectSignup } from '$lib/server/services/signup';
import type { Actions, PageServerLoad } from './$types';

// Opening the link only shows the form (mail scanners open links too); the POST with the
// password chosen at sign-up creates the shop.
export const load: PageServerLoad = async ({ params }) => {
	const s = await inspectSignup(params.token);
	if (s.state !== 'ok') return { signup: null, problem: SIGNUP_MESSAGES[s.state] };
	return { signup: { email: s.email, ownerName: s.ownerName, shopName: s.shopName }, problem: null };
};

export const actions: Actions = {
	confirm: async (event) => {
		const form = await event.request.clone().formData();
		const s = await inspectSignup(event.params.token);
		if (s.state !== 'ok') return fail(410, { errors: { form: SIGNUP_MESSAGES[s.state] } as Record<string, string> });
		const parsed = passwordSchema.safeParse(form.get('password'));
		if (!parsed.success) return fail(400, { errors: { password: parsed.error.issues[0].message } as Record<string, string> });
		const client = event.getClientAddress();
		const blocked = await signInBlocked(s.email, client);
		if (blocked) return fail(429, { errors: { form: blocked } as Record<string, string> });
		const result = await confirmSignup(event.params.token, parsed.data);
		if (result.state === 'wrong_password') {
			await noteAttempt(s.email, client, false);
			return fail(400, { errors: { password: 'That is not the password you chose when you signed up.' } as Record<string, string> });
		}
		if (result.state !== 'ok') return fail(410, { errors: { form: SIGNUP_MESSAGES[result.state] } as Record<string, string> });
		await noteAttempt(s.email, client, true);
		setActiveShop(event, result.shopId);
		// The password was just checked by confirmSignup: sign in without checking it again.
		await signInVerified(event, { id: result.userId, email: result.email, name: s.ownerName }, '/');
	}
};
