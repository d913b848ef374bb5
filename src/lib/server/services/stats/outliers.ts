// Unusual readings: outside the limits of their day, outside their group's Tukey fences or with
// |modified z| beyond the threshold, one page at a time.
import type { OutliersResponse } from '../../../contract';
import { MEASUREMENT_INFO } from '../../../measurements';
import type { OutliersQuery } from '../../../schemas/stats';
import type { Conn } from '../../db/scope';
import { seriesKeys, seriesOf } from '../../db/series';
import { groupData, outlierCount, outlierPage } from '../../queries/stats';
import { expandCounts, modifiedZ, MODIFIED_Z_FACTOR, MODIFIED_Z_THRESHOLD, outlierReasons, summarizeSorted } from '../../stats';
import { echo, labelOf, limitKey, resolveFamily, selection } from './selection';

export async function outliers(conn: Conn, shopId: string, q: OutliersQuery): Promise<OutliersResponse> {
	const { family, byId } = await resolveFamily(conn, shopId, q.family);
	const keys = seriesKeys(q.measurement, q.stage, q.side);
	const sel = selection(q, keys, family);
	const { groups, source } = await groupData(conn, shopId, sel);
	const judged = groups.map((g) => {
		const s = summarizeSorted(expandCounts(g.counts), g.moments.n ? g.moments : undefined);
		return { g, s };
	});
	const params = judged.map(({ g, s }) => ({
		familyId: g.familyId,
		key: g.key,
		low: s.fences.low,
		high: s.fences.high,
		median: s.quantiles.p50,
		mad: s.mad
	}));
	const byGroup = new Map(params.map((p) => [limitKey(p.familyId, p.key), p]));
	const opts = { factor: MODIFIED_Z_FACTOR, zLimit: MODIFIED_Z_THRESHOLD };
	const rows = await outlierPage(conn, shopId, sel, params, { ...opts, sort: q.sort, limit: q.pageSize, offset: (q.page - 1) * q.pageSize });
	const total = rows[0]?.total ?? (q.page > 1 ? await outlierCount(conn, shopId, sel, params, opts) : 0);
	const fam = (id: string) => labelOf(byId, id);
	return {
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		source,
		page: q.page,
		pageSize: q.pageSize,
		sort: q.sort,
		total,
		pages: Math.ceil(total / q.pageSize),
		groups: judged.map(({ g, s }) => {
			const { side, stage } = seriesOf(g.key);
			return { family: fam(g.familyId), side, stage, n: s.n, median: s.quantiles.p50, mad: s.mad, fences: s.fences };
		}),
		items: rows.map((r) => {
			const p = byGroup.get(limitKey(r.familyId, r.key))!;
			const fences = { low: p.low, high: p.high };
			return {
				id: r.id,
				family: fam(r.familyId),
				side: r.side,
				stage: seriesOf(r.key).stage,
				cylinder: r.cylinder,
				valve: r.valve,
				headId: r.headId,
				serial: r.serial,
				value: r.value,
				measuredAt: new Date(r.measuredAt).toISOString(),
				measuredBy: r.measuredBy,
				limits: r.limitFrom ? { min: r.limitMin, max: r.limitMax, effectiveFrom: r.limitFrom } : null,
				modifiedZ: modifiedZ(r.value, p.median, p.mad),
				reasons: outlierReasons({ value: r.value, limits: { min: r.limitMin, max: r.limitMax }, fences, median: p.median, mad: p.mad, decimals: MEASUREMENT_INFO[q.measurement].decimals })
			};
		})
	};
}
