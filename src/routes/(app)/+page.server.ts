import { requireRole } from '$lib/server/auth/guards';
import type { PageServerLoad } from './$types';

// The overview's figures are fetched by the browser from /api/v1/overview; the shell is empty.
export const load: PageServerLoad = (event) => {
	requireRole(event, 'viewer');
	return {};
};
