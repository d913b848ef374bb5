import { fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { familySchema, limitSchema } from '$lib/schemas/families';
import { isUnit, MEASUREMENT_INFO, toCanonical, unitFits } from '$lib/measurements';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { orError, orFail } from '$lib/server/http';
import { idParam, whoIs } from '$lib/server/params';
import { addLimitVersion, editFamily, familyLimits, familyStems } from '$lib/server/services/families';
import { today } from '$lib/server/services/head-view';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	const id = idParam(event.params.id, 'family');
	return { ...(await orError(() => familyLimits(actor.shopId, id))), canEdit: roleAtLeast(actor.role, 'engineer') };
};

export const actions: Actions = {
	update: async (event) => {
		const actor = requireRole(event, 'engineer');
		const id = idParam(event.params.id, 'family');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = familySchema.safeParse({ copyFrom: '', ...raw });
		if (!parsed.success) return fail(400, { action: 'update', values: raw, errors: fieldErrors(parsed.error) });
		const d = parsed.data;
		const { stems, errors } = familyStems(d);
		if (Object.keys(errors).length) return fail(400, { action: 'update', values: raw, errors });
		return orFail(
			async () => {
				await editFamily(actor.shopId, whoIs(actor), id, d, stems);
				return { action: 'update', ok: true, message: 'Family saved.' };
			},
			(e) => ({ action: 'update', values: raw, errors: e.fields })
		);
	},
	limit: async (event) => {
		const actor = requireRole(event, 'engineer');
		const id = idParam(event.params.id, 'family');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = limitSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { action: 'limit', values: raw, errors: fieldErrors(parsed.error) });
		const d = parsed.data;
		const info = MEASUREMENT_INFO[d.measurement];
		if (!isUnit(d.unit) || !unitFits(d.measurement, d.unit)) return fail(400, { action: 'limit', values: raw, errors: { unit: `${info.label} is given in ${info.units.join(' or ')}.` } });
		// A version may start today or later: the days already past keep the limits they had.
		if (d.effectiveFrom < today()) return fail(400, { action: 'limit', values: raw, errors: { effectiveFrom: `A new version starts today (${today()}) or later; readings already taken keep the limits of their day.` } });
		const min = d.min === null ? null : toCanonical(d.min, d.unit);
		const max = d.max === null ? null : toCanonical(d.max, d.unit);
		for (const [k, v] of [['min', min], ['max', max]] as const) {
			if (v !== null && v > info.max) return fail(400, { action: 'limit', values: raw, errors: { [k]: `That is more than any ${info.label.toLowerCase()} can be (${info.max} ${info.unit === 'um' ? 'µm' : info.unit}).` } });
		}
		await orError(() => addLimitVersion(actor.shopId, whoIs(actor), id, d, { min, max }));
		return { action: 'limit', ok: true, message: `New limit version from ${d.effectiveFrom} saved.` };
	}
};
