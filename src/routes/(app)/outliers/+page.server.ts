import { requireRole } from '$lib/server/auth/guards';
import { filterFamilies } from '$lib/server/filter-families';
import type { PageServerLoad } from './$types';

// The readings themselves are fetched by the browser from /api/v1/stats/outliers.
export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return { families: await filterFamilies(actor.shopId) };
};
