import { fail, redirect } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { intakeSchema, leakRowSchema } from '$lib/schemas/heads';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { whoIs } from '$lib/server/params';
import { listFamilies } from '$lib/server/queries/families';
import { customerEmails, customersOf } from '$lib/server/queries/heads';
import { today } from '$lib/server/services/head-view';
import { intakeHead, type LeakEntry } from '$lib/server/services/heads';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return withShop(db, actor.shopId, async (tx) => ({
		families: (await listFamilies(tx, actor.shopId)).map((f) => ({ id: f.id, code: f.code, description: f.description, cylinders: f.cylinders })),
		customers: await customersOf(tx, actor.shopId),
		emails: await customerEmails(tx, actor.shopId),
		today: today()
	}));
};

const str = (v: FormDataEntryValue | null) => (typeof v === 'string' ? v : '');

function violates(e: unknown, constraint: string): boolean {
	const cause = ((e as { cause?: unknown })?.cause ?? e) as { code?: string; constraint_name?: string };
	return cause?.code === '23505' && cause.constraint_name === constraint;
}

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
		let result;
		try {
			result = await withShop(db, actor.shopId, (tx) => intakeHead(tx, actor.shopId, whoIs(actor), { ...parsed.data, leaks }));
		} catch (e) {
			// Two people taking in the same serial at the same moment: the second is told so.
			if (violates(e, 'heads_shop_serial_key')) return fail(409, { values: raw, errors: { form: 'The head was not saved.', serial: `Head ${parsed.data.serial} was just taken in by someone else.` } });
			throw e;
		}
		if (!result.ok) return fail(result.code, { values: raw, errors: { form: result.message, ...result.errors } });
		redirect(303, `/heads/${result.head.id}?taken=1`);
	}
};
