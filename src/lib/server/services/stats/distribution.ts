// Distributions of one measurement: pooled frequency tables and moments, finished with the pure
// summaries of stats/, each group judged against its own limits in force.
import { MEASUREMENT_INFO } from '../../../measurements';
import type { CompareResponse, DistributionResponse, DistributionSummary } from '../../../contract';
import type { CompareQuery, DistributionQuery } from '../../../schemas/stats';
import { today } from '../../../domain/days';
import type { Conn } from '../../db/scope';
import { seriesKeys } from '../../db/series';
import { groupData, type GroupData, type LimitRow } from '../../queries/stats';
import { countBeyond, expandCounts, mergeMoments, momentsOf, summarizeSorted, type Moments, type ValueCount } from '../../stats';
import { echo, label, limitInfo, limitKey, limitsMap, resolveFamily, selection } from './selection';

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

/** The summary of pooled groups, each judged against its own limits in force. */
function summarize(groups: readonly GroupData[], limits: Map<string, LimitRow>, single: LimitRow | null): DistributionSummary {
	const { counts, moments } = pool(groups);
	const sorted = expandCounts(counts);
	const s = summarizeSorted(sorted, sorted.length ? moments : undefined);
	const fenced = countBeyond(counts, s.fences.low, s.fences.high);
	let below = 0;
	let above = 0;
	let judged = 0;
	for (const g of groups) {
		const l = limits.get(limitKey(g.familyId, g.key));
		if (!l) continue;
		const b = countBeyond(g.counts, l.min, l.max);
		below += b.below;
		above += b.above;
		judged += g.moments.n;
	}
	return {
		...s,
		tukeyOutside: fenced.below + fenced.above,
		limits: limitInfo(single),
		outside: { below, above, judged, share: judged ? (below + above) / judged : null }
	};
}

export async function distribution(conn: Conn, shopId: string, q: DistributionQuery, opts: { source?: 'auto' | 'readings' } = {}): Promise<DistributionResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const keys = seriesKeys(q.measurement, q.stage, q.side);
	const asOf = q.to ?? today();
	const sel = selection(q, keys, family);
	const [{ groups, source }, limits] = await Promise.all([
		groupData(conn, shopId, sel, opts),
		limitsMap(conn, shopId, asOf, { familyIds: sel.familyIds, keys })
	]);
	const single = family && q.side && q.stage ? (limits.get(limitKey(family.id, keys[0])) ?? null) : null;
	return {
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		limitsAsOf: asOf,
		source,
		...summarize(groups, limits, single)
	};
}

export async function compare(conn: Conn, shopId: string, q: CompareQuery, opts: { source?: 'auto' | 'readings' } = {}): Promise<CompareResponse> {
	const { byId } = await resolveFamily(conn, shopId, undefined);
	const keys = seriesKeys(q.measurement, q.stage, q.side);
	const asOf = q.to ?? today();
	const [{ groups, source }, limits] = await Promise.all([
		groupData(conn, shopId, selection(q, keys, null), opts),
		limitsMap(conn, shopId, asOf, { keys })
	]);
	const perFamily = new Map<string, GroupData[]>();
	for (const g of groups) perFamily.set(g.familyId, [...(perFamily.get(g.familyId) ?? []), g]);
	const families = [...perFamily].map(([familyId, gs]) => {
		const f = byId.get(familyId) ?? { id: familyId, code: '?', cylinders: 0 };
		const single = q.side && q.stage ? (limits.get(limitKey(familyId, keys[0])) ?? null) : null;
		return { family: label(f), ...summarize(gs, limits, single) };
	});
	families.sort((a, b) => {
		const ma = a.quantiles.p50;
		const mb = b.quantiles.p50;
		if (ma !== mb) return ma === null ? 1 : mb === null ? -1 : ma - mb;
		return a.family.code.localeCompare(b.family.code);
	});
	return { measurement: q.measurement, unit: MEASUREMENT_INFO[q.measurement].unit, filters: echo(q), limitsAsOf: asOf, source, families };
}
