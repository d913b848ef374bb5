import { json } from '@sveltejs/kit';
import { checkQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { parseQuery } from '$lib/server/http';
import { checkReading } from '$lib/server/services/stats';
import type { RequestHandler } from './$types';

/** One reading against its family's limits and fleet, with the decision it suggests. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(checkQuerySchema, event.url);
	return json(await withShop(db, actor.shopId, (tx) => checkReading(tx, actor.shopId, q)));
};
