import { error } from '@sveltejs/kit';
import { nonEmpty } from '$lib/schemas/audit';
import { headFilterSchema } from '$lib/schemas/heads';
import { requireRole } from '$lib/server/auth/guards';
import { roleAtLeast } from '$lib/server/auth/access';
import { headsPage } from '$lib/server/services/heads';
import type { PageServerLoad } from './$types';

const PAGE_SIZE = 50;

// Sorting, filtering and paging happen in the database, driven by the URL, so a view can be
// shared as a link and a shop with thousands of heads sends 50 rows at a time.
export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'viewer');
	const parsed = headFilterSchema.safeParse(nonEmpty(event.url.searchParams));
	if (!parsed.success) error(400, parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '));
	const filter = parsed.data;
	const { rows, total, families } = await headsPage(actor.shopId, filter, PAGE_SIZE);
	return { filter, rows, total, pageSize: PAGE_SIZE, families, canIntake: roleAtLeast(actor.role, 'machinist') };
};
