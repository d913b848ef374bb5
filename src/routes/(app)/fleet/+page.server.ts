import { requireRole } from '$lib/server/auth/guards';
import { familyChoices } from '$lib/server/services/analysis';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return { families: await familyChoices(actor.shopId) };
};
