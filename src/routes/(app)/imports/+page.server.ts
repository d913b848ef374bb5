import { error, fail } from '@sveltejs/kit';
import { idSchema } from '$lib/schemas/members';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { uploadLimitBytes } from '$lib/server/env';
import { audit } from '$lib/server/queries/audit';
import { listFamilies } from '$lib/server/queries/families';
import { listBatches, shopOnReject, undoBatch } from '$lib/server/queries/imports';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return withShop(db, actor.shopId, async (tx) => ({
		batches: await listBatches(tx, actor.shopId, { limit: 200 }),
		families: (await listFamilies(tx, actor.shopId)).map((f) => ({ code: f.code, cylinders: f.cylinders, intakeValves: f.intakeValves, exhaustValves: f.exhaustValves })),
		canUndo: actor.role === 'owner' || actor.role === 'engineer',
		onRejectDefault: await shopOnReject(tx, actor.shopId),
		limitMb: Math.round(uploadLimitBytes / 1024 / 1024)
	}));
};

export const actions: Actions = {
	undo: async (event) => {
		const actor = requireRole(event, 'engineer');
		const parsed = idSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) error(404, 'No such import.');
		const id = parsed.data.id;
		const r = await withShop(db, actor.shopId, async (tx) => {
			const res = await undoBatch(tx, actor.shopId, id);
			if (res.ok) {
				await audit(tx, actor.shopId, { userId: actor.userId, label: actor.email }, { entity: 'import', entityId: id, action: 'undo', before: { status: 'committed' }, after: { status: 'undone', readingsRemoved: res.readingsRemoved, headsRemoved: res.headsRemoved } });
			}
			return res;
		});
		if (!r.ok) {
			if (r.status === 404) error(404, r.message);
			return fail(r.status, { message: r.message });
		}
		return { undone: id, message: `Import undone: ${r.readingsRemoved.toLocaleString('en-US')} readings and ${r.headsRemoved} heads removed.` };
	}
};
