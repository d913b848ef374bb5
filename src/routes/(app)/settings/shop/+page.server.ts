import { requireRole } from '$lib/server/auth/guards';
import { shopSettingsPage } from '$lib/server/services/shop-settings';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'owner');
	return shopSettingsPage(actor.shopId);
};
