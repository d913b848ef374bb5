import { error } from '@sveltejs/kit';
import { idSchema } from '$lib/schemas/members';
import { requireRole } from '$lib/server/auth/guards';
import { uploadLimitBytes } from '$lib/server/env';
import { orFail } from '$lib/server/http';
import { importsPage, undoImport } from '$lib/server/services/imports';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	const page = await importsPage(actor.shopId);
	return {
		batches: page.batches,
		families: page.families,
		canUndo: actor.role === 'owner' || actor.role === 'engineer',
		onRejectDefault: page.onRejectDefault,
		limitMb: Math.round(uploadLimitBytes / 1024 / 1024)
	};
};

export const actions: Actions = {
	undo: async (event) => {
		const actor = requireRole(event, 'engineer');
		const parsed = idSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) error(404, 'No such import.');
		const id = parsed.data.id;
		// No such import is the page's 404; an import that cannot be undone is the form's message.
		return orFail(
			async () => {
				const r = await undoImport(actor.shopId, { userId: actor.userId, label: actor.email }, id);
				return { undone: id, message: `Import undone: ${r.readingsRemoved.toLocaleString('en-US')} readings and ${r.headsRemoved} heads removed.` };
			},
			(e) => ({ message: e.message })
		);
	}
};
