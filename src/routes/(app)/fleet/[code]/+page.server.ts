import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { familyChoices } from '$lib/server/services/analysis';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	const families = await familyChoices(actor.shopId);
	const family = families.find((f) => f.code.toLowerCase() === event.params.code.toLowerCase());
	if (!family) error(404, 'No such family in this shop.');
	return { families, family };
};
