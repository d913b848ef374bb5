import { json } from '@sveltejs/kit';
import { firstPassQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { orError, parseQuery } from '$lib/server/http';
import { firstPassFor } from '$lib/server/services/stats/for-shop';
import type { RequestHandler } from './$types';

/** First-pass yield: heads whose final check passed without a second round, per family and machinist, with Wilson intervals. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(firstPassQuerySchema, event.url);
	return json(await orError(() => firstPassFor(actor.shopId, q)));
};
