import { error } from '@sveltejs/kit';
import { auditFilterSchema, nonEmpty } from '$lib/schemas/audit';
import { requireRole } from '$lib/server/auth/guards';
import { auditLogPage } from '$lib/server/services/audit-log';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'engineer');
	const parsed = auditFilterSchema.safeParse(nonEmpty(event.url.searchParams));
	if (!parsed.success) error(400, parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '));
	const filter = parsed.data;
	return { filter, ...(await auditLogPage(actor.shopId, filter)) };
};
