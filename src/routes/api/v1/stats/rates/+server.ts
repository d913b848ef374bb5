import { json } from '@sveltejs/kit';
import { ratesQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { ratesFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** Failure or repair rates per valve position, by side, family and cylinder, with Wilson intervals and the intake-vs-exhaust test. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(ratesQuerySchema, event.url);
	return json(await orError(() => ratesFor(actor.shopId, q)));
};
