import { fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { signupSchema } from '$lib/schemas/shop';
import { claimAttempt } from '$lib/server/auth/rate-limit';
import { publicSignup } from '$lib/server/env';
import { SIGNUP_LINK_HOURS, noShopsYet, requestSignup } from '$lib/server/services/signup';
import type { Actions, PageServerLoad } from './$types';

const CLOSED = 'Public sign-up is turned off on this server. Ask the person who runs it to create your shop (npm run shop:create).';

export const load: PageServerLoad = async () => ({
	open: publicSignup,
	closedMessage: CLOSED,
	firstShop: publicSignup ? await noShopsYet() : false,
	linkHours: SIGNUP_LINK_HOURS
});

export const actions: Actions = {
	default: async (event) => {
		if (!publicSignup) return fail(403, { errors: { form: CLOSED } as Record<string, string>, values: {} as Record<string, string> });
		const form = await event.request.formData();
		const raw = Object.fromEntries(['ownerName', 'email', 'password', 'shopName', 'lengthUnit', 'distanceUnit', 'currency'].map((k) => [k, form.get(k) ?? undefined]));
		// What the form shows again after a refusal (never the password).
		const values = Object.fromEntries(
			['ownerName', 'email', 'shopName', 'lengthUnit', 'distanceUnit', 'currency'].map((k) => [k, typeof raw[k] === 'string' ? (raw[k] as string).slice(0, 254) : ''])
		);
		const parsed = signupSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), values });
		const input = parsed.data;
		const client = event.getClientAddress();
		// Every sign-up counts against the limit (checked and counted in one step, so parallel
		// requests cannot all slip under it) and the form cannot be used to flood a mailbox.
		const claim = await claimAttempt(input.email, client);
		if (claim.blocked) return fail(429, { errors: { form: claim.blocked } as Record<string, string>, values });
		// Mailed after answering; a send that fails is retried from the outbox.
		await requestSignup(input);
		return { sent: true, email: input.email };
	}
};
