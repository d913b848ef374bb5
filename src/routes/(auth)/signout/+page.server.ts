import { redirect } from '@sveltejs/kit';
import { signOut } from '../../../auth';
import { requireUser } from '$lib/server/auth/guards';
import type { Actions, PageServerLoad } from './$types';

// Signing out is a POST (a form in the layout); a GET here just goes home.
export const load: PageServerLoad = () => redirect(303, '/');

export const actions: Actions = {
	default: async (event) => {
		requireUser(event);
		await signOut(event); // clears the session cookie and redirects to the form's redirectTo
	}
};
