import { error, fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { idSchema, tokenSchema } from '$lib/schemas/members';
import { requireRole } from '$lib/server/auth/guards';
import { orError } from '$lib/server/http';
import { createApiToken, revokeApiToken, visibleTokens } from '$lib/server/services/tokens';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'engineer');
	// Owners see every token of the shop; engineers their own.
	return { tokens: await visibleTokens(actor), me: actor.userId };
};

export const actions: Actions = {
	create: async (event) => {
		const actor = requireRole(event, 'engineer');
		const form = Object.fromEntries(await event.request.formData());
		const parsed = tokenSchema.safeParse(form);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), name: String(form.name ?? '').slice(0, 80) });
		// The only time the token is shown: it is stored hashed.
		return { created: await createApiToken(actor, parsed.data.name, Number(parsed.data.expiresInDays)) };
	},
	revoke: async (event) => {
		const actor = requireRole(event, 'engineer');
		const parsed = idSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) error(404, 'No such token.');
		const t = await orError(() => revokeApiToken(actor, parsed.data.id));
		if (!t) return fail(409, { errors: { form: 'That token was already revoked.' } });
		return { revoked: t.name };
	}
};
