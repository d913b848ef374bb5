import { error, fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { familySchema, limitSchema } from '$lib/schemas/families';
import { isUnit, MEASUREMENT_INFO, toCanonical, unitFits } from '$lib/measurements';
import { limitOn } from '$lib/inspection';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { idParam, whoIs } from '$lib/server/params';
import { audit } from '$lib/server/queries/audit';
import { familyById, familyCodeTaken, familyUsage, limitVersions, saveLimitVersion, updateFamily } from '$lib/server/queries/families';
import { today } from '$lib/server/services/head-view';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	const id = idParam(event.params.id, 'family');
	return withShop(db, actor.shopId, async (tx) => {
		const family = await familyById(tx, actor.shopId, id);
		if (!family) error(404, 'No such family in this shop.');
		const versions = await limitVersions(tx, actor.shopId, id);
		const heads = (await familyUsage(tx, actor.shopId)).get(id) ?? 0;
		const now = today();
		// One line per measurement × side × stage: the version in force today, a later one
		// waiting, and every version before.
		const groups = new Map<string, typeof versions>();
		for (const v of versions) {
			const k = `${v.stage}|${v.measurement}|${v.side}`;
			groups.set(k, [...(groups.get(k) ?? []), v]);
		}
		const lines = [...groups.entries()].map(([k, vs]) => {
			const [stage, measurement, side] = k.split('|');
			const current = limitOn(vs, vs[0].measurement, vs[0].side, vs[0].stage, now);
			return {
				key: k,
				stage,
				measurement,
				side,
				label: MEASUREMENT_INFO[vs[0].measurement].label,
				unit: MEASUREMENT_INFO[vs[0].measurement].unit,
				decimals: MEASUREMENT_INFO[vs[0].measurement].decimals,
				current: current ? vs.find((v) => v.effectiveFrom === current.effectiveFrom)! : null,
				versions: vs.map((v) => ({ ...v, createdAt: v.createdAt.toISOString().slice(0, 10), state: v.effectiveFrom > now ? 'waiting' : current && v.effectiveFrom === current.effectiveFrom ? 'in force' : 'past' }))
			};
		});
		return { family, heads, lines, today: now, canEdit: roleAtLeast(actor.role, 'engineer') };
	});
};

export const actions: Actions = {
	update: async (event) => {
		const actor = requireRole(event, 'engineer');
		const id = idParam(event.params.id, 'family');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = familySchema.safeParse({ copyFrom: '', ...raw });
		if (!parsed.success) return fail(400, { action: 'update', values: raw, errors: fieldErrors(parsed.error) });
		const d = parsed.data;
		const stems = { intakeStemMm: d.intakeStem === null ? null : toCanonical(d.intakeStem, d.stemUnit), exhaustStemMm: d.exhaustStem === null ? null : toCanonical(d.exhaustStem, d.stemUnit) };
		const errors: Record<string, string> = {};
		for (const [k, v] of [['intakeStem', stems.intakeStemMm], ['exhaustStem', stems.exhaustStemMm]] as const) {
			if (v !== null && (v < 3 || v > 20)) errors[k] = 'A stem diameter is between 3 and 20 mm (0.118–0.787 in).';
		}
		if (Object.keys(errors).length) return fail(400, { action: 'update', values: raw, errors });
		return withShop(db, actor.shopId, async (tx) => {
			const before = await familyById(tx, actor.shopId, id);
			if (!before) error(404, 'No such family in this shop.');
			const heads = (await familyUsage(tx, actor.shopId)).get(id) ?? 0;
			const layoutChanged = before.cylinders !== d.cylinders || before.intakeValves !== d.intakeValves || before.exhaustValves !== d.exhaustValves;
			if (layoutChanged && heads > 0) {
				return fail(409, { action: 'update', values: raw, errors: { cylinders: `${heads} head${heads === 1 ? ' is' : 's are'} recorded with this layout; it cannot change. Add a new family instead.` } });
			}
			if (await familyCodeTaken(tx, actor.shopId, d.code, id)) return fail(409, { action: 'update', values: raw, errors: { code: `There is already a family ${d.code}.` } });
			const after = { code: d.code, description: d.description, cylinders: d.cylinders, intakeValves: d.intakeValves, exhaustValves: d.exhaustValves, ...stems };
			await updateFamily(tx, actor.shopId, id, after);
			await audit(tx, actor.shopId, whoIs(actor), {
				entity: 'family',
				entityId: id,
				action: 'update',
				before: { code: before.code, description: before.description, cylinders: before.cylinders, intakeValves: before.intakeValves, exhaustValves: before.exhaustValves, intakeStemMm: before.intakeStemMm, exhaustStemMm: before.exhaustStemMm },
				after
			});
			return { action: 'update', ok: true, message: 'Family saved.' };
		});
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
		return withShop(db, actor.shopId, async (tx) => {
			const family = await familyById(tx, actor.shopId, id);
			if (!family) error(404, 'No such family in this shop.');
			const sides = d.side === 'both' ? (['intake', 'exhaust'] as const) : ([d.side] as const);
			for (const side of sides) {
				const { row, replaced } = await saveLimitVersion(tx, { shopId: actor.shopId, familyId: id, measurement: d.measurement, side, stage: d.stage, min, max, effectiveFrom: d.effectiveFrom, note: d.note, createdBy: actor.userId });
				await audit(tx, actor.shopId, whoIs(actor), {
					entity: 'limit',
					entityId: row.id,
					action: replaced ? 'update' : 'create',
					before: replaced ? { min: replaced.min, max: replaced.max, note: replaced.note } : undefined,
					after: { family: family.code, measurement: d.measurement, side, stage: d.stage, min, max, effectiveFrom: d.effectiveFrom, note: d.note, typed: { min: d.min, max: d.max, unit: d.unit } }
				});
			}
			return { action: 'limit', ok: true, message: `New limit version from ${d.effectiveFrom} saved.` };
		});
	}
};
