import { error } from '@sveltejs/kit';
import { idSchema } from '$lib/schemas/members';
import { requireRole } from '$lib/server/auth/guards';
import { uploadLimitBytes } from '$lib/server/env';
import { isDomainError } from '$lib/server/errors';
import { failWith } from '$lib/server/http';
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
		try {
			const r = await undoImport(actor.shopId, { userId: actor.userId, label: actor.email }, id);
			return { undone: id, message: `Import undone: ${r.readingsRemoved.toLocaleString('en-US')} readings and ${r.headsRemoved} heads removed.` };
		} catch (e) {
			if (!isDomainError(e)) throw e;
			// No such import is the page's 404; an import that cannot be undone is the form's message.
			if (e.status === 404) error(404, e.message);
			return failWith(e);
		}
	}
};
