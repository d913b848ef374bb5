import { error, redirect } from '@sveltejs/kit';
import { safeRedirect } from '$lib/schemas/auth';
import { setActiveShop } from '$lib/server/auth/actor';
import { requireUser } from '$lib/server/auth/guards';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = () => redirect(303, '/');

export const actions: Actions = {
	default: async (event) => {
		const actor = requireUser(event);
		const form = await event.request.formData();
		const shopId = String(form.get('shopId') ?? '');
		// Only a shop the user belongs to; anything else looks like a shop that does not exist.
		if (!actor.memberships.some((m) => m.shopId === shopId)) error(404, 'No such shop.');
		setActiveShop(event, shopId);
		redirect(303, safeRedirect(form.get('redirectTo')));
	}
};
