import { json } from '@sveltejs/kit';
import { capabilityQuerySchema } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { parseQuery } from '$lib/server/http';
import { capabilityStudy } from '$lib/server/services/stats';
import type { RequestHandler } from './$types';

/** Cp/Cpk (within σ from moving ranges) and Pp/Ppk of the shop's rework against the final limits in force. */
export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const q = parseQuery(capabilityQuerySchema, event.url);
	return json(await withShop(db, actor.shopId, (tx) => capabilityStudy(tx, actor.shopId, q)));
};
