import { json } from '@sveltejs/kit';
import { checkQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { checkReadingFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** One reading against its family's limits and fleet, with the decision it suggests. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(checkQuerySchema, event.url);
	return json(await orError(() => checkReadingFor(actor.shopId, q)));
};
