import { fail, redirect } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { familySchema, sealPassSchema } from '$lib/schemas/families';
import { toCanonical } from '$lib/measurements';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { whoIs } from '$lib/server/params';
import { audit } from '$lib/server/queries/audit';
import { familyCodeTaken, familyUsage, insertFamily, limitsInForce, listFamilies, saveLimitVersion } from '$lib/server/queries/families';
import { comebackCounts, shopSettings, updateShopSettings } from '$lib/server/queries/heads';
import { DEFAULT_SEAL_MARKS } from '$lib/inspection';
import { today } from '$lib/server/services/head-view';
import { wilson } from '$lib/server/stats/rates';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return withShop(db, actor.shopId, async (tx) => {
		const [fams, usage, cb, settings] = await Promise.all([listFamilies(tx, actor.shopId), familyUsage(tx, actor.shopId), comebackCounts(tx, actor.shopId), shopSettings(tx, actor.shopId)]);
		const byFamily = new Map(cb.map((c) => [c.family_id, c]));
		return {
			families: fams.map((f) => {
				const c = byFamily.get(f.id);
				const rate = c && c.released > 0 ? wilson(c.came_back, c.released) : null;
				return {
					id: f.id,
					code: f.code,
					description: f.description,
					cylinders: f.cylinders,
					intakeValves: f.intakeValves,
					exhaustValves: f.exhaustValves,
					intakeStemMm: f.intakeStemMm,
					exhaustStemMm: f.exhaustStemMm,
					heads: usage.get(f.id) ?? 0,
					released: c?.released ?? 0,
					cameBack: c?.came_back ?? 0,
					rate: rate && rate.rate !== null ? { p: rate.rate, low: rate.low ?? 0, high: rate.high ?? 1 } : null
				};
			}),
			marks: {
				vacuumHoldPassPct: settings.vacuumHoldPassPct ?? DEFAULT_SEAL_MARKS.vacuumHoldPassPct,
				fluidHoldPassSeconds: settings.fluidHoldPassSeconds ?? DEFAULT_SEAL_MARKS.fluidHoldPassSeconds
			},
			canEdit: roleAtLeast(actor.role, 'engineer')
		};
	});
};

export const actions: Actions = {
	create: async (event) => {
		const actor = requireRole(event, 'engineer');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = familySchema.safeParse(raw);
		if (!parsed.success) return fail(400, { action: 'create', values: raw, errors: fieldErrors(parsed.error) });
		const d = parsed.data;
		const stems = { intakeStemMm: d.intakeStem === null ? null : toCanonical(d.intakeStem, d.stemUnit), exhaustStemMm: d.exhaustStem === null ? null : toCanonical(d.exhaustStem, d.stemUnit) };
		const errors: Record<string, string> = {};
		for (const [k, v] of [['intakeStem', stems.intakeStemMm], ['exhaustStem', stems.exhaustStemMm]] as const) {
			if (v !== null && (v < 3 || v > 20)) errors[k] = 'A stem diameter is between 3 and 20 mm (0.118–0.787 in).';
		}
		if (Object.keys(errors).length) return fail(400, { action: 'create', values: raw, errors });
		const r = await withShop(db, actor.shopId, async (tx) => {
			if (await familyCodeTaken(tx, actor.shopId, d.code)) return { error: `There is already a family ${d.code}.` };
			const f = await insertFamily(tx, { shopId: actor.shopId, code: d.code, description: d.description, cylinders: d.cylinders, intakeValves: d.intakeValves, exhaustValves: d.exhaustValves, ...stems });
			let copied = 0;
			if (d.copyFrom) {
				// The limits in force today of another family, as this family's first version.
				const from = (await limitsInForce(tx, actor.shopId)).filter((l) => l.familyId === d.copyFrom);
				for (const l of from) {
					await saveLimitVersion(tx, { shopId: actor.shopId, familyId: f.id, measurement: l.measurement as never, side: l.side, stage: l.stage, min: l.min, max: l.max, effectiveFrom: today(), note: 'Copied when the family was created', createdBy: actor.userId });
					copied++;
				}
			}
			await audit(tx, actor.shopId, whoIs(actor), { entity: 'family', entityId: f.id, action: 'create', after: { ...d, ...stems, limitsCopied: copied } });
			return { id: f.id };
		});
		if ('error' in r) return fail(409, { action: 'create', values: raw, errors: { code: r.error } });
		redirect(303, `/families/${r.id}?created=1`);
	},
	sealPass: async (event) => {
		const actor = requireRole(event, 'engineer');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = sealPassSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { action: 'sealPass', values: raw, errors: fieldErrors(parsed.error) });
		await withShop(db, actor.shopId, async (tx) => {
			const { before, after } = await updateShopSettings(tx, actor.shopId, parsed.data);
			await audit(tx, actor.shopId, whoIs(actor), {
				entity: 'shop_settings',
				entityId: actor.shopId,
				action: 'update',
				before: { vacuumHoldPassPct: before.vacuumHoldPassPct ?? null, fluidHoldPassSeconds: before.fluidHoldPassSeconds ?? null },
				after: { vacuumHoldPassPct: after.vacuumHoldPassPct, fluidHoldPassSeconds: after.fluidHoldPassSeconds }
			});
		});
		return { action: 'sealPass', ok: true, message: 'Seal test pass marks saved.' };
	}
};
