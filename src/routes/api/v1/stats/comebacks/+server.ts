import { json } from '@sveltejs/kit';
import { comebacksQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { parseQuery } from '$lib/server/http';
import { comebacks } from '$lib/server/services/stats';
import type { RequestHandler } from './$types';

/** Released heads that came back, per family, with Wilson intervals. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(comebacksQuerySchema, event.url);
	return json(await withShop(db, actor.shopId, (tx) => comebacks(tx, actor.shopId, q)));
};
