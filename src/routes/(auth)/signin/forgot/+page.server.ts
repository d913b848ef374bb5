import { fail } from '@sveltejs/kit';
import { fieldErrors, linkSignIn } from '$lib/schemas/auth';
import { noteAttempt, signInBlocked } from '$lib/server/auth/rate-limit';
import { db } from '$lib/server/db';
import { deliverQueued } from '$lib/server/mail';
import { requestReset } from '$lib/server/services/password-reset';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = () => ({});

export const actions: Actions = {
	default: async (event) => {
		const form = await event.request.formData();
		const parsed = linkSignIn.safeParse({ email: form.get('email') });
		if (!parsed.success) return fail(400, { email: String(form.get('email') ?? '').slice(0, 254), errors: fieldErrors(parsed.error) });
		const { email } = parsed.data;
		const client = event.getClientAddress();
		const blocked = await signInBlocked(email, client);
		if (blocked) return fail(429, { email, errors: { form: blocked } });
		await noteAttempt(email, client, false);
		const mailId = await requestReset(db, email, event.url.origin);
		// The same answer whether or not the address has an account; a send that failed is
		// retried from the outbox.
		if (mailId) await deliverQueued([mailId]);
		return { sent: true, email };
	}
};
