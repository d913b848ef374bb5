import { json } from '@sveltejs/kit';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { overview } from '$lib/server/services/overview';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	return json(await overview(actor.shopId, { withImports: roleAtLeast(actor.role, 'machinist') }));
};
