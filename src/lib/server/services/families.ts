// Engine families and their limit versions, as the families pages show and change them: the list
// with each family's comeback rate and the shop's seal test pass marks, one family's limit
// history, creating and editing a family, a new limit version, the pass marks. Each function opens
// the shop's scope, refuses with a DomainError and audits what it changed in the same transaction.
import type { z } from 'zod';
import { MEASUREMENT_INFO, toCanonical } from '$lib/measurements';
import { DEFAULT_SEAL_MARKS, limitOn } from '$lib/inspection';
import type { familySchema, limitSchema, sealPassSchema } from '$lib/schemas/families';
import { inShop } from '../db';
import { conflict, notFound } from '../errors';
import { audit } from '../queries/audit';
import { familyById, familyCodeTaken, familyUsage, insertFamily, limitsInForce, limitVersions, listFamilies, saveLimitVersion, updateFamily } from '../queries/families';
import { comebackCounts, shopSettings, updateShopSettings } from '../queries/heads';
import { wilson } from '../stats/rates';
import type { Who } from './entry';
import { today } from './head-view';

export type FamilyInput = z.output<typeof familySchema>;
export type LimitInput = z.output<typeof limitSchema>;
export type Stems = { intakeStemMm: number | null; exhaustStemMm: number | null };

const NO_FAMILY = 'No such family in this shop.';

/** The typed stem diameters in mm, and a message per stem outside 3–20 mm. */
export function familyStems(d: FamilyInput): { stems: Stems; errors: Record<string, string> } {
	const stems = { intakeStemMm: d.intakeStem === null ? null : toCanonical(d.intakeStem, d.stemUnit), exhaustStemMm: d.exhaustStem === null ? null : toCanonical(d.exhaustStem, d.stemUnit) };
	const errors: Record<string, string> = {};
	for (const [k, v] of [['intakeStem', stems.intakeStemMm], ['exhaustStem', stems.exhaustStemMm]] as const) {
		if (v !== null && (v < 3 || v > 20)) errors[k] = 'A stem diameter is between 3 and 20 mm (0.118–0.787 in).';
	}
	return { stems, errors };
}

/** Every family with its heads, releases, comebacks and comeback rate; the seal pass marks. */
export function familiesOverview(shopId: string) {
	return inShop(shopId, async (tx) => {
		const [fams, usage, cb, settings] = await Promise.all([listFamilies(tx, shopId), familyUsage(tx, shopId), comebackCounts(tx, shopId), shopSettings(tx, shopId)]);
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
			}
		};
	});
}

/** A new family (409 when the code is taken), optionally with the limits in force today of
 * another family as its first version; its id. */
export function createFamily(shopId: string, who: Who, d: FamilyInput, stems: Stems): Promise<string> {
	return inShop(shopId, async (tx) => {
		if (await familyCodeTaken(tx, shopId, d.code)) throw conflict(`There is already a family ${d.code}.`, { code: `There is already a family ${d.code}.` });
		const f = await insertFamily(tx, { shopId, code: d.code, description: d.description, cylinders: d.cylinders, intakeValves: d.intakeValves, exhaustValves: d.exhaustValves, ...stems });
		let copied = 0;
		if (d.copyFrom) {
			// The limits in force today of another family, as this family's first version.
			const from = (await limitsInForce(tx, shopId)).filter((l) => l.familyId === d.copyFrom);
			for (const l of from) {
				await saveLimitVersion(tx, { shopId, familyId: f.id, measurement: l.measurement as never, side: l.side, stage: l.stage, min: l.min, max: l.max, effectiveFrom: today(), note: 'Copied when the family was created', createdBy: who.userId });
				copied++;
			}
		}
		await audit(tx, shopId, who, { entity: 'family', entityId: f.id, action: 'create', after: { ...d, ...stems, limitsCopied: copied } });
		return f.id;
	});
}

/** The shop's seal test pass marks. */
export function saveSealPassMarks(shopId: string, who: Who, marks: z.output<typeof sealPassSchema>): Promise<void> {
	return inShop(shopId, async (tx) => {
		const { before, after } = await updateShopSettings(tx, shopId, marks);
		await audit(tx, shopId, who, {
			entity: 'shop_settings',
			entityId: shopId,
			action: 'update',
			before: { vacuumHoldPassPct: before.vacuumHoldPassPct ?? null, fluidHoldPassSeconds: before.fluidHoldPassSeconds ?? null },
			after: { vacuumHoldPassPct: after.vacuumHoldPassPct, fluidHoldPassSeconds: after.fluidHoldPassSeconds }
		});
	});
}

/** One family with its heads and one line per measurement × side × stage: the version in force
 * today, a later one waiting, and every version before. */
export function familyLimits(shopId: string, id: string) {
	return inShop(shopId, async (tx) => {
		const family = await familyById(tx, shopId, id);
		if (!family) throw notFound(NO_FAMILY);
		const versions = await limitVersions(tx, shopId, id);
		const heads = (await familyUsage(tx, shopId)).get(id) ?? 0;
		const now = today();
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
		return { family, heads, lines, today: now };
	});
}

/** Saves a family's details. Its layout (cylinders, valves) cannot change once heads are
 * recorded with it, nor its code become another family's (409 for both). */
export function editFamily(shopId: string, who: Who, id: string, d: FamilyInput, stems: Stems): Promise<void> {
	return inShop(shopId, async (tx) => {
		const before = await familyById(tx, shopId, id);
		if (!before) throw notFound(NO_FAMILY);
		const heads = (await familyUsage(tx, shopId)).get(id) ?? 0;
		const layoutChanged = before.cylinders !== d.cylinders || before.intakeValves !== d.intakeValves || before.exhaustValves !== d.exhaustValves;
		if (layoutChanged && heads > 0) {
			const why = `${heads} head${heads === 1 ? ' is' : 's are'} recorded with this layout; it cannot change. Add a new family instead.`;
			throw conflict(why, { cylinders: why });
		}
		if (await familyCodeTaken(tx, shopId, d.code, id)) throw conflict(`There is already a family ${d.code}.`, { code: `There is already a family ${d.code}.` });
		const after = { code: d.code, description: d.description, cylinders: d.cylinders, intakeValves: d.intakeValves, exhaustValves: d.exhaustValves, ...stems };
		await updateFamily(tx, shopId, id, after);
		await audit(tx, shopId, who, {
			entity: 'family',
			entityId: id,
			action: 'update',
			before: { code: before.code, description: before.description, cylinders: before.cylinders, intakeValves: before.intakeValves, exhaustValves: before.exhaustValves, intakeStemMm: before.intakeStemMm, exhaustStemMm: before.exhaustStemMm },
			after
		});
	});
}

/** A new limit version (both sides, or one) from `d.effectiveFrom` on, with `min`/`max` in the
 * measurement's canonical unit; a version of the same day is replaced. */
export function addLimitVersion(shopId: string, who: Who, id: string, d: LimitInput, bounds: { min: number | null; max: number | null }): Promise<void> {
	const { min, max } = bounds;
	return inShop(shopId, async (tx) => {
		const family = await familyById(tx, shopId, id);
		if (!family) throw notFound(NO_FAMILY);
		const sides = d.side === 'both' ? (['intake', 'exhaust'] as const) : ([d.side] as const);
		for (const side of sides) {
			const { row, replaced } = await saveLimitVersion(tx, { shopId, familyId: id, measurement: d.measurement, side, stage: d.stage, min, max, effectiveFrom: d.effectiveFrom, note: d.note, createdBy: who.userId });
			await audit(tx, shopId, who, {
				entity: 'limit',
				entityId: row.id,
				action: replaced ? 'update' : 'create',
				before: replaced ? { min: replaced.min, max: replaced.max, note: replaced.note } : undefined,
				after: { family: family.code, measurement: d.measurement, side, stage: d.stage, min, max, effectiveFrom: d.effectiveFrom, note: d.note, typed: { min: d.min, max: d.max, unit: d.unit } }
			});
		}
	});
}
