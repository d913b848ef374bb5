import { json } from '@sveltejs/kit';
import { capabilityQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { capabilityFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** Cp/Cpk (within σ from moving ranges) and Pp/Ppk of the shop's rework against the final limits in force. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(capabilityQuerySchema, event.url);
	return json(await orError(() => capabilityFor(actor.shopId, q)));
};
