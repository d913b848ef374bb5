import { json } from '@sveltejs/kit';
import { compareQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { compareFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** The same summary per engine family, sorted by median. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(compareQuerySchema, event.url);
	return json(await orError(() => compareFor(actor.shopId, q)));
};
