import { fail } from '@sveltejs/kit';
import { fieldErrors, linkSignIn } from '$lib/schemas/auth';
import { requestPasswordResetMail } from '$lib/server/auth/mail-requests';
import { claimAttempt } from '$lib/server/auth/rate-limit';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = () => ({});

export const actions: Actions = {
	default: async (event) => {
		const form = await event.request.formData();
		const parsed = linkSignIn.safeParse({ email: form.get('email') });
		if (!parsed.success) return fail(400, { email: String(form.get('email') ?? '').slice(0, 254), errors: fieldErrors(parsed.error) });
		const { email } = parsed.data;
		// Counts against the sign-in limit, so the form cannot be used to flood a mailbox.
		const claim = await claimAttempt(email, event.getClientAddress());
		if (claim.blocked !== null) return fail(429, { email, errors: { form: claim.blocked } });
		// The same work and the same answer whether or not the address has an account: only a
		// request is stored now; the link is made and mailed after this answer has gone out.
		await requestPasswordResetMail(email);
		return { sent: true, email };
	}
};
