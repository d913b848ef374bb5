import { error, redirect } from '@sveltejs/kit';
import { safeRedirect } from '$lib/schemas/auth';
import { ACTIVE_SHOP_COOKIE } from '$lib/server/auth/actor';
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
		event.cookies.set(ACTIVE_SHOP_COOKIE, shopId, {
			path: '/',
			httpOnly: true,
			sameSite: 'lax',
			secure: event.url.protocol === 'https:',
			maxAge: 365 * 24 * 3600
		});
		redirect(303, safeRedirect(form.get('redirectTo')));
	}
};
