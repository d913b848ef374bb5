// Distributions of one measurement: pooled frequency tables and moments, finished with the pure
// summaries of stats/. `outside` judges each reading against the limit version in force on the day
// it was measured (the failure question, as the rates answer asks it of valve positions);
// `outsideAsOf` against the limits in force on `limitsAsOf` (a separate question: how the same
// readings look against today's limits, the ones the charts draw).
import { MEASUREMENT_INFO } from '../../../measurements';
import type { CompareResponse, DistributionResponse, DistributionSummary } from '../../../contract';
import type { CompareQuery, DistributionQuery } from '../../../schemas/stats';
import { today } from '../../../domain/days';
import type { Conn } from '../../db/scope';
import { seriesKeys } from '../../db/series';
import { groupData, limitVersions, outsideByDay, type GroupData, type JudgedRow, type LimitRow, type LimitVersion, type Selection } from '../../queries/stats';
import { countBeyond, expandCounts, mergeMoments, momentsOf, summarizeSorted, type Moments, type ValueCount } from '../../stats';
import { echo, label, limitInfo, limitKey, resolveFamily, selection } from './selection';

/** Pools groups: frequency tables added value by value, moments merged (Chan et al.). */
function pool(groups: readonly GroupData[]): { counts: ValueCount[]; moments: Moments } {
	if (groups.length === 1) return groups[0];
	const counts = new Map<number, number>();
	let moments: Moments = momentsOf([]);
	for (const g of groups) {
		for (const [v, n] of g.counts) counts.set(v, (counts.get(v) ?? 0) + n);
		moments = mergeMoments(moments, g.moments);
	}
	return { counts: [...counts].sort((a, b) => a[0] - b[0]), moments };
}

type Outside = DistributionSummary['outside'];

const outsideOf = (below: number, above: number, judged: number): Outside => ({ below, above, judged, share: judged ? (below + above) / judged : null });

/** Readings outside the limits of their day, added over the rows (family × series) given. */
function byDay(rows: readonly JudgedRow[]): Outside {
	let below = 0;
	let above = 0;
	let judged = 0;
	for (const r of rows) {
		below += r.below;
		above += r.above;
		judged += r.judged;
	}
	return outsideOf(below, above, judged);
}

/** The summary of pooled groups: `outside` by the limits of each reading's day (`judged`),
 * `outsideAsOf` each group against its own limits in force on the day asked. */
function summarize(groups: readonly GroupData[], judged: readonly JudgedRow[], limits: Map<string, LimitRow>, single: LimitRow | null): DistributionSummary {
	const { counts, moments } = pool(groups);
	const sorted = expandCounts(counts);
	const s = summarizeSorted(sorted, sorted.length ? moments : undefined);
	const fenced = countBeyond(counts, s.fences.low, s.fences.high);
	let below = 0;
	let above = 0;
	let asOf = 0;
	for (const g of groups) {
		const l = limits.get(limitKey(g.familyId, g.key));
		if (!l) continue;
		const b = countBeyond(g.counts, l.min, l.max);
		below += b.below;
		above += b.above;
		asOf += g.moments.n;
	}
	return {
		...s,
		tukeyOutside: fenced.below + fenced.above,
		limits: limitInfo(single),
		outside: byDay(judged),
		outsideAsOf: outsideOf(below, above, asOf)
	};
}

/** The versions in force on `day`, one per family × series, from the full list (in effective order). */
function inForceOn(versions: readonly LimitVersion[], day: string): Map<string, LimitRow> {
	const out = new Map<string, LimitRow>();
	for (const v of versions) if (v.effectiveFrom <= day) out.set(limitKey(v.familyId, v.key), v);
	return out;
}

/** Frequency tables, the versions and the readings judged by day, for one selection. */
async function gather(conn: Conn, shopId: string, sel: Selection, asOf: string, opts: { source?: 'auto' | 'readings' }) {
	const [{ groups, source }, versions, { rows: judged, splitReadings }] = await Promise.all([
		groupData(conn, shopId, sel, opts),
		limitVersions(conn, shopId, sel),
		outsideByDay(conn, shopId, sel, opts)
	]);
	// A month a limit version starts in was read from readings too.
	return { groups, source: splitReadings && source === 'summaries' ? ('summaries+readings' as const) : source, judged, limits: inForceOn(versions, asOf) };
}

export async function distribution(conn: Conn, shopId: string, q: DistributionQuery, opts: { source?: 'auto' | 'readings' } = {}): Promise<DistributionResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const keys = seriesKeys(q.measurement, q.stage, q.side);
	const asOf = q.to ?? today();
	const { groups, source, judged, limits } = await gather(conn, shopId, selection(q, keys, family), asOf, opts);
	const single = family && q.side && q.stage ? (limits.get(limitKey(family.id, keys[0])) ?? null) : null;
	return {
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		limitsAsOf: asOf,
		source,
		...summarize(groups, judged, limits, single)
	};
}

export async function compare(conn: Conn, shopId: string, q: CompareQuery, opts: { source?: 'auto' | 'readings' } = {}): Promise<CompareResponse> {
	const { byId } = await resolveFamily(conn, shopId, undefined);
	const keys = seriesKeys(q.measurement, q.stage, q.side);
	const asOf = q.to ?? today();
	const { groups, source, judged, limits } = await gather(conn, shopId, selection(q, keys, null), asOf, opts);
	const perFamily = new Map<string, GroupData[]>();
	for (const g of groups) perFamily.set(g.familyId, [...(perFamily.get(g.familyId) ?? []), g]);
	const families = [...perFamily].map(([familyId, gs]) => {
		const f = byId.get(familyId) ?? { id: familyId, code: '?', cylinders: 0 };
		const single = q.side && q.stage ? (limits.get(limitKey(familyId, keys[0])) ?? null) : null;
		return { family: label(f), ...summarize(gs, judged.filter((j) => j.familyId === familyId), limits, single) };
	});
	families.sort((a, b) => {
		const ma = a.quantiles.p50;
		const mb = b.quantiles.p50;
		if (ma !== mb) return ma === null ? 1 : mb === null ? -1 : ma - mb;
		return a.family.code.localeCompare(b.family.code);
	});
	return { measurement: q.measurement, unit: MEASUREMENT_INFO[q.measurement].unit, filters: echo(q), limitsAsOf: asOf, source, families };
}
