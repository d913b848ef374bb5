import { fail } from '@sveltejs/kit';
import { baselineFormSchema, issuesMessage } from '$lib/schemas/stats';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { orFail } from '$lib/server/http';
import { whoIs } from '$lib/server/params';
import { familiesFor } from '$lib/server/services/analysis';
import { recomputeBaselineFor } from '$lib/server/services/stats/for-shop';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return { ...(await familiesFor(event, 'machinist')), canSetBaseline: roleAtLeast(actor.role, 'engineer') };
};

export const actions: Actions = {
	/** Recompute the control limits of one family × series from the readings of a period. */
	baseline: async (event) => {
		const actor = requireRole(event, 'engineer');
		const raw = Object.fromEntries([...(await event.request.formData())].map(([k, v]) => [k, String(v)]).filter(([, v]) => v.trim() !== ''));
		const parsed = baselineFormSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { action: 'baseline', values: raw, message: issuesMessage(parsed.error.issues) });
		return orFail(
			async () => {
				const b = await recomputeBaselineFor(actor.shopId, whoIs(actor), parsed.data);
				return { action: 'baseline', ok: true, message: `Control limits recomputed from ${b.n} readings of ${b.from} to ${b.to}.`, values: raw };
			},
			(e) => ({ action: 'baseline', values: raw, message: e.message }),
			[]
		);
	}
};
