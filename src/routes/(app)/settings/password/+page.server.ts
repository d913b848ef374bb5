import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import { fieldErrors, newPasswordSchema } from '$lib/schemas/auth';
import { requireUser } from '$lib/server/auth/guards';
import { claimAttempt, settleAttempt } from '$lib/server/auth/rate-limit';
import { changePassword } from '$lib/server/services/password-reset';
import type { Actions, PageServerLoad } from './$types';

const schema = z
	.object({
		current: z.string().min(1, 'Enter your current password.').max(200, 'Passwords are at most 200 characters.'),
		password: newPasswordSchema,
		confirm: z.string()
	})
	.refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

export const load: PageServerLoad = (event) => {
	requireUser(event);
	return {};
};

export const actions: Actions = {
	default: async (event) => {
		const actor = requireUser(event);
		const parsed = schema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error) });
		// Guesses at the current password count like sign-in attempts.
		const claim = await claimAttempt(actor.email, event.getClientAddress());
		if (claim.blocked !== null) return fail(429, { errors: { form: claim.blocked } });
		const result = await changePassword(actor.userId, parsed.data.current, parsed.data.password, actor.sessionId);
		await settleAttempt(claim.attemptId, result.ok);
		if (!result.ok) return fail(400, { errors: { [result.field]: result.message } });
		return {
			ok: true,
			message: result.ended
				? `Password changed. Your ${result.ended === 1 ? 'other session was' : `${result.ended} other sessions were`} signed out.`
				: 'Password changed.'
		};
	}
};
