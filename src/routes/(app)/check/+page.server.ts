import { checkQuerySchema, queryObject } from '$lib/schemas/stats';
import { requireRole } from '$lib/server/auth/guards';
import { familyChoices } from '$lib/server/services/analysis';
import { checkVerdict } from '$lib/server/services/reading-check';
import type { PageServerLoad } from './$types';

// With a complete query string (the form sent without JavaScript, or a shared link) the verdict
// is worked out here too, so the page answers before any script runs.
export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	const families = await familyChoices(actor.shopId);
	const params = queryObject(event.url.searchParams);
	let verdict: Awaited<ReturnType<typeof checkVerdict>> = { result: null, problem: null };
	if (params.value !== undefined) {
		const q = checkQuerySchema.safeParse(params);
		verdict = q.success ? await checkVerdict(actor.shopId, q.data) : { result: null, problem: q.error.issues.map((i) => i.message).join('; ') };
	}
	return { families, ...verdict };
};
