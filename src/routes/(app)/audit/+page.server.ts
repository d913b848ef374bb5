import { error } from '@sveltejs/kit';
import { auditFilterSchema, nonEmpty } from '$lib/schemas/audit';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { auditEntities, listAudit } from '$lib/server/queries/audit';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'engineer');
	const parsed = auditFilterSchema.safeParse(nonEmpty(event.url.searchParams));
	if (!parsed.success) error(400, parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '));
	const filter = parsed.data;
	return withShop(db, actor.shopId, async (tx) => ({
		filter,
		entities: await auditEntities(tx, actor.shopId),
		...(await listAudit(tx, actor.shopId, filter))
	}));
};
