import { json } from '@sveltejs/kit';
import { compareQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { parseQuery } from '$lib/server/http';
import { compare } from '$lib/server/services/stats';
import type { RequestHandler } from './$types';

/** The same summary per engine family, sorted by median. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(compareQuerySchema, event.url);
	return json(await withShop(db, actor.shopId, (tx) => compare(tx, actor.shopId, q)));
};
