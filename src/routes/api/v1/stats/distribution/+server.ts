import { json } from '@sveltejs/kit';
import { distributionQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { distributionFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** One measurement's distribution: moments, type-7 quantiles, MAD, Tukey fences, histogram, limits and the share outside them. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(distributionQuerySchema, event.url);
	return json(await orError(() => distributionFor(actor.shopId, q)));
};
