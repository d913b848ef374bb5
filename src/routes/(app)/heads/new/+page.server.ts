import { fail, redirect } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { intakeSchema, leakRowSchema } from '$lib/schemas/heads';
import { requireRole } from '$lib/server/auth/guards';
import { whoIs } from '$lib/server/params';
import { today } from '$lib/server/services/head-view';
import { intakeChoices, takeInHead, type LeakEntry } from '$lib/server/services/heads';
import { orFail } from '$lib/server/http';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return { ...(await intakeChoices(actor.shopId)), today: today() };
};

const str = (v: FormDataEntryValue | null) => (typeof v === 'string' ? v : '');

export const actions: Actions = {
	default: async (event) => {
		const actor = requireRole(event, 'machinist');
		const form = await event.request.formData();
		const raw: Record<string, string> = {};
		for (const [k, v] of form) if (typeof v === 'string') raw[k] = v.slice(0, 4000);
		const errors: Record<string, string> = {};
		const parsed = intakeSchema.safeParse(raw);
		if (!parsed.success) Object.assign(errors, fieldErrors(parsed.error));
		const leaks: LeakEntry[] = [];
		for (let c = 1; c <= 16; c++) {
			const row = { pct: str(form.get(`leak.${c}.pct`)), pin: str(form.get(`leak.${c}.pin`)), held: str(form.get(`leak.${c}.held`)), path: str(form.get(`leak.${c}.path`)) || 'none' };
			if (!row.pct && !row.pin && !row.held && row.path === 'none') continue;
			const r = leakRowSchema.safeParse(row);
			if (!r.success) errors[`leak.${c}`] = r.error.issues[0].message;
			else leaks.push({ cylinder: c, ...r.data });
		}
		if (!parsed.success || Object.keys(errors).length) {
			return fail(400, { values: raw, errors: { form: 'The head was not saved: correct the fields marked.', ...errors } });
		}
		const data = { ...parsed.data, leaks };
		return orFail(
			async () => {
				const head = await takeInHead(actor.shopId, whoIs(actor), data);
				redirect(303, `/heads/${head.id}?taken=1`);
			},
			(e) => ({ values: raw, errors: { form: e.message, ...e.fields } })
		);
	}
};
