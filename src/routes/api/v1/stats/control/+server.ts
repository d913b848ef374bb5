import { json } from '@sveltejs/kit';
import { controlQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { parseQuery } from '$lib/server/http';
import { control } from '$lib/server/services/stats';
import type { RequestHandler } from './$types';

/** Individuals and moving-range chart of the most recent readings, in time order. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(controlQuerySchema, event.url);
	return json(await withShop(db, actor.shopId, (tx) => control(tx, actor.shopId, q)));
};
