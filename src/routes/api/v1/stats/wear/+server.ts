import { json } from '@sveltejs/kit';
import { wearQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { wearFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** A measurement against the head's mileage: least-squares line with the 95 % band of the mean. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(wearQuerySchema, event.url);
	return json(await orError(() => wearFor(actor.shopId, q)));
};
