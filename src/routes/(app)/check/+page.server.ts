import { isHttpError } from '@sveltejs/kit';
import { checkQuerySchema, queryObject } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { familyChoices } from '$lib/server/services/analysis';
import { checkReading } from '$lib/server/services/stats';
import type { PageServerLoad } from './$types';

// With a complete query string (the form sent without JavaScript, or a shared link) the verdict
// is worked out here too, so the page answers before any script runs.
export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	const families = await familyChoices(actor.shopId);
	const params = queryObject(event.url.searchParams);
	let result = null;
	let problem: string | null = null;
	if (params.value !== undefined) {
		const q = checkQuerySchema.safeParse(params);
		if (q.success) {
			try {
				result = await withShop(db, actor.shopId, (tx) => checkReading(tx, actor.shopId, q.data));
			} catch (e) {
				if (!isHttpError(e)) throw e;
				problem = e.body.message;
			}
		} else problem = q.error.issues.map((i) => i.message).join('; ');
	}
	return { families, result, problem };
};
