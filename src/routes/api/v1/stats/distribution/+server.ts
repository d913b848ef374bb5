import { json } from '@sveltejs/kit';
import { distributionQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { parseQuery } from '$lib/server/http';
import { distribution } from '$lib/server/services/stats';
import type { RequestHandler } from './$types';

/** One measurement's distribution: moments, type-7 quantiles, MAD, Tukey fences, histogram, limits and the share outside them. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(distributionQuerySchema, event.url);
	return json(await withShop(db, actor.shopId, (tx) => distribution(tx, actor.shopId, q)));
};
