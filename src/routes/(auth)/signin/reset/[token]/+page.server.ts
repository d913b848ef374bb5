import { fail, redirect } from '@sveltejs/kit';
import { z } from 'zod';
import { fieldErrors, newPasswordSchema } from '$lib/schemas/auth';
import { completeReset, resetLinkWorks } from '$lib/server/services/password-reset';
import type { Actions, PageServerLoad } from './$types';

const INVALID = 'This link has expired or was already used. Ask for a new one.';
const schema = z
	.object({ password: newPasswordSchema, confirm: z.string() })
	.refine((v) => v.password === v.confirm, { message: 'The two passwords differ.', path: ['confirm'] });

export const load: PageServerLoad = async ({ params }) => ({ valid: await resetLinkWorks(params.token), problem: INVALID });

export const actions: Actions = {
	default: async ({ request, params }) => {
		const form = Object.fromEntries(await request.formData());
		const parsed = schema.safeParse(form);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error) });
		if (!(await completeReset(params.token, parsed.data.password))) return fail(410, { errors: { form: INVALID } });
		redirect(303, '/signin?reset=1');
	}
};
