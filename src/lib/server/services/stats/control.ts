// Individuals and moving-range chart of the most recent readings, in time order.
import type { ControlResponse } from '../../../contract';
import { MEASUREMENT_INFO } from '../../../measurements';
import type { ControlQuery } from '../../../schemas/stats';
import { today } from '../../../domain/days';
import type { Conn } from '../../db/scope';
import { seriesKey } from '../../db/series';
import { readingsInTimeOrder, type FamilyRef } from '../../queries/stats';
import { controlChart } from '../../stats';
import { echo, label, limitInfo, limitKey, limitsMap, resolveFamily, selection } from './selection';

export async function control(conn: Conn, shopId: string, q: ControlQuery): Promise<ControlResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const fam = family as FamilyRef;
	const key = seriesKey(q.measurement, q.stage, q.side);
	const [rows, limits] = await Promise.all([
		readingsInTimeOrder(conn, shopId, selection(q, [key], fam), q.limit),
		limitsMap(conn, shopId, q.to ?? today(), { familyIds: [fam.id], keys: [key] })
	]);
	const chart = controlChart(rows.map((r) => ({ t: new Date(r.measuredAt).getTime(), value: r.value })));
	const beyond = new Set(chart.beyondLimits);
	const mrBeyond = new Set(chart.mrBeyondLimits);
	return {
		family: label(fam),
		side: q.side,
		stage: q.stage,
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		total: rows[0]?.total ?? 0,
		n: chart.n,
		centre: chart.centre,
		ucl: chart.ucl,
		lcl: chart.lcl,
		mrBar: chart.mrBar,
		mrUcl: chart.mrUcl,
		mrLcl: chart.mrLcl,
		specLimits: limitInfo(limits.get(limitKey(fam.id, key))),
		points: chart.points.map((p, i) => {
			const r = rows[p.sourceIndex];
			return {
				id: r.id,
				t: new Date(p.t).toISOString(),
				value: p.value,
				mr: p.mr,
				serial: r.serial,
				measuredBy: r.measuredBy,
				beyond: beyond.has(i),
				mrBeyond: mrBeyond.has(i)
			};
		}),
		beyondLimits: chart.beyondLimits,
		mrBeyondLimits: chart.mrBeyondLimits
	};
}
