import { json } from '@sveltejs/kit';
import { controlQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { controlFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** Individuals and moving-range chart of the most recent readings, in time order. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(controlQuerySchema, event.url);
	return json(await orError(() => controlFor(actor.shopId, q)));
};
