// What every statistics answer starts from: the family a request names (404 when the shop has
// none of that code), the selection it makes, the limits in force and the filters echoed back.
import type { EchoFilters, FamilyLabel, LimitInfo } from '../../../contract';
import type { StatsFilters } from '../../../schemas/stats';
import { notFound } from '../../errors';
import type { Conn } from '../../db/scope';
import { limitsOn, shopFamilies, type DecisionSelection, type FamilyRef, type LimitRow, type Selection } from '../../queries/stats';

/** The filters a response was computed for (absent ones left out). */
export function echo(q: Partial<StatsFilters>): EchoFilters {
	const out: EchoFilters = {};
	for (const k of ['family', 'side', 'stage', 'from', 'to', 'machinist', 'customer', 'mileageMin', 'mileageMax'] as const) {
		const v = q[k];
		if (v !== undefined) (out as Record<string, unknown>)[k] = v;
	}
	return out;
}

export const label = (f: FamilyRef): FamilyLabel => ({ id: f.id, code: f.code });

/** The label of a family id (its code, or '?' for one the shop no longer lists). */
export const labelOf = (byId: ReadonlyMap<string, FamilyRef>, id: string): FamilyLabel => label(byId.get(id) ?? { id, code: '?', cylinders: 0 });

interface Resolved {
	families: FamilyRef[];
	byId: Map<string, FamilyRef>;
	family: FamilyRef | null;
}

/** The shop's families, and the one `code` names (404 when it names none). */
export async function resolveFamily(conn: Conn, shopId: string, code: string | undefined): Promise<Resolved> {
	const families = await shopFamilies(conn, shopId);
	const byId = new Map(families.map((f) => [f.id, f]));
	if (!code) return { families, byId, family: null };
	const alike = families.filter((f) => f.code.toLowerCase() === code.toLowerCase());
	const family = families.find((f) => f.code === code) ?? (alike.length === 1 ? alike[0] : null);
	if (!family) {
		const known = families.map((f) => f.code).join(', ');
		throw notFound(`No engine family "${code}" in this shop.${known ? ` Families: ${known}.` : ' The shop has no families yet.'}`);
	}
	return { families, byId, family };
}

export function selection(q: Partial<StatsFilters>, keys: number[], family: FamilyRef | null): Selection {
	const { side: _side, ...head } = headSelection(q, family);
	return { ...head, keys, machinist: q.machinist ?? null };
}

/** The head-level filters of a selection (decisions, comebacks): no series, no machinist. */
export function headSelection(q: Partial<StatsFilters>, family: FamilyRef | null): DecisionSelection {
	return {
		familyIds: family ? [family.id] : null,
		side: q.side ?? null,
		from: q.from ?? null,
		to: q.to ?? null,
		customer: q.customer ?? null,
		mileageMin: q.mileageMin ?? null,
		mileageMax: q.mileageMax ?? null
	};
}

export const limitKey = (familyId: string, key: number) => `${familyId}|${key}`;

export async function limitsMap(conn: Conn, shopId: string, day: string, only?: { familyIds?: string[] | null; keys?: number[] }): Promise<Map<string, LimitRow>> {
	const rows = await limitsOn(conn, shopId, day, only);
	return new Map(rows.map((l) => [limitKey(l.familyId, l.key), l]));
}

export const limitInfo = (l: LimitRow | undefined | null): LimitInfo | null =>
	l ? { min: l.min, max: l.max, effectiveFrom: l.effectiveFrom } : null;

