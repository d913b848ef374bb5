import { json } from '@sveltejs/kit';
import { comebacksQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { comebacksFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** Released heads that came back, per family, with Wilson intervals. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(comebacksQuerySchema, event.url);
	return json(await orError(() => comebacksFor(actor.shopId, q)));
};
