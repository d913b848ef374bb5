import { error, fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { idSchema, tokenSchema } from '$lib/schemas/members';
import { requireRole } from '$lib/server/auth/guards';
import { newApiToken, sha256Hex, tokenDisplayPrefix } from '$lib/server/auth/tokens';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { audit } from '$lib/server/queries/audit';
import { insertToken, listTokens, revokeToken } from '$lib/server/queries/tokens';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'engineer');
	const tokens = await withShop(db, actor.shopId, (tx) => listTokens(tx, actor.shopId));
	// Owners see every token of the shop; engineers their own.
	return { tokens: actor.role === 'owner' ? tokens : tokens.filter((t) => t.userId === actor.userId), me: actor.userId };
};

export const actions: Actions = {
	create: async (event) => {
		const actor = requireRole(event, 'engineer');
		const form = Object.fromEntries(await event.request.formData());
		const parsed = tokenSchema.safeParse(form);
		if (!parsed.success) return fail(400, { errors: fieldErrors(parsed.error), name: String(form.name ?? '').slice(0, 80) });
		const days = Number(parsed.data.expiresInDays);
		const token = newApiToken();
		const expiresAt = days ? new Date(Date.now() + days * 86_400_000) : null;
		const row = await withShop(db, actor.shopId, async (tx) => {
			const t = await insertToken(tx, { shopId: actor.shopId, userId: actor.userId, name: parsed.data.name, prefix: tokenDisplayPrefix(token), tokenHash: sha256Hex(token), role: actor.role, expiresAt });
			await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'api_token', entityId: t.id, action: 'create', after: { name: t.name, prefix: t.prefix, role: t.role, expiresAt } });
			return t;
		});
		// The only time the token is shown: it is stored hashed.
		return { created: { ...row, token } };
	},
	revoke: async (event) => {
		const actor = requireRole(event, 'engineer');
		const parsed = idSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) error(404, 'No such token.');
		return withShop(db, actor.shopId, async (tx) => {
			const mine = (await listTokens(tx, actor.shopId)).find((t) => t.id === parsed.data.id);
			if (!mine || (actor.role !== 'owner' && mine.userId !== actor.userId)) error(404, 'No such token.');
			const t = await revokeToken(tx, actor.shopId, parsed.data.id);
			if (!t) return fail(409, { errors: { form: 'That token was already revoked.' } });
			await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'api_token', entityId: t.id, action: 'revoke', before: { name: t.name, prefix: t.prefix } });
			return { revoked: t.name };
		});
	}
};
