import { json } from '@sveltejs/kit';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { overviewFigures } from '$lib/server/queries/overview';
import type { RequestHandler } from './$types';

export const GET: RequestHandler = async (event) => {
	const actor = requireRole(event, 'viewer');
	const figures = await withShop(db, actor.shopId, (tx) => overviewFigures(tx, actor.shopId, { withImports: roleAtLeast(actor.role, 'machinist') }));
	return json(figures);
};
