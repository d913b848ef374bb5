import { fail, redirect } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { familySchema, sealPassSchema } from '$lib/schemas/families';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { whoIs } from '$lib/server/params';
import { createFamily, familiesOverview, familyStems, saveSealPassMarks } from '$lib/server/services/families';
import { orFail } from '$lib/server/http';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return { ...(await familiesOverview(actor.shopId)), canEdit: roleAtLeast(actor.role, 'engineer') };
};

export const actions: Actions = {
	create: async (event) => {
		const actor = requireRole(event, 'engineer');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = familySchema.safeParse(raw);
		if (!parsed.success) return fail(400, { action: 'create', values: raw, errors: fieldErrors(parsed.error) });
		const d = parsed.data;
		const { stems, errors } = familyStems(d);
		if (Object.keys(errors).length) return fail(400, { action: 'create', values: raw, errors });
		return orFail(
			async () => {
				const id = await createFamily(actor.shopId, whoIs(actor), d, stems);
				redirect(303, `/families/${id}?created=1`);
			},
			(e) => ({ action: 'create', values: raw, errors: e.fields })
		);
	},
	sealPass: async (event) => {
		const actor = requireRole(event, 'engineer');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = sealPassSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { action: 'sealPass', values: raw, errors: fieldErrors(parsed.error) });
		await saveSealPassMarks(actor.shopId, whoIs(actor), parsed.data);
		return { action: 'sealPass', ok: true, message: 'Seal test pass marks saved.' };
	}
};
