import { json } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guards';
import { familiesWithLimits } from '$lib/server/services/analysis';
import type { RequestHandler } from './$types';

/** The shop's engine families, their layout and the limits in force today, so a file can be
 * prepared against them. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	return json(await familiesWithLimits(actor.shopId));
};
