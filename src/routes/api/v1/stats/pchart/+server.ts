import { json } from '@sveltejs/kit';
import { pchartQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { pchartFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** Monthly share of valve positions outside the limits of their day, with p-chart limits. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(pchartQuerySchema, event.url);
	return json(await orError(() => pchartFor(actor.shopId, q)));
};
