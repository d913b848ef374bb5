import { json } from '@sveltejs/kit';
import { capabilityQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { capabilityByMachinistFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** Capability per machinist, side by side, against the final limits in force. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(capabilityQuerySchema, event.url);
	return json(await orError(() => capabilityByMachinistFor(actor.shopId, q)));
};
