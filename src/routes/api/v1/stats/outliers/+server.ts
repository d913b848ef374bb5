import { json } from '@sveltejs/kit';
import { outliersQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { outliersFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** Readings outside the limits of their day, outside Tukey's fences or with |modified z| > 3.5, paged. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(outliersQuerySchema, event.url);
	return json(await orError(() => outliersFor(actor.shopId, q)));
};
