import { json } from '@sveltejs/kit';
import { ratesQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { parseQuery } from '$lib/server/http';
import { rates } from '$lib/server/services/stats';
import type { RequestHandler } from './$types';

/** Failure or repair rates per valve position, by side, family and cylinder, with Wilson intervals and the intake-vs-exhaust test. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(ratesQuerySchema, event.url);
	return json(await withShop(db, actor.shopId, (tx) => rates(tx, actor.shopId, q)));
};
