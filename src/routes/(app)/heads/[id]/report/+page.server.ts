import { requireRole } from '$lib/server/auth/guards';
import { orError } from '$lib/server/http';
import { idParam } from '$lib/server/params';
import { headReport } from '$lib/server/services/report';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'viewer');
	const id = idParam(event.params.id);
	return { id, report: await orError(() => headReport(actor.shopId, actor.shopName, id)) };
};
