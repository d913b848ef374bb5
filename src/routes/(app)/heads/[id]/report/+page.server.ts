import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { idParam } from '$lib/server/params';
import { loadHeadView } from '$lib/server/services/head-view';
import { buildReport } from '$lib/server/services/report';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'viewer');
	const id = idParam(event.params.id);
	return withShop(db, actor.shopId, async (tx) => {
		const view = await loadHeadView(tx, actor.shopId, id);
		if (!view) error(404, 'No such head in this shop.');
		return { id, report: buildReport(view, actor.shopName) };
	});
};
