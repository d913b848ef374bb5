// Process capability of final readings against the final limits in force: for the whole
// selection (with its histogram and fitted curve) and per machinist, side by side.
import type { CapabilityMachinistsResponse, CapabilityResponse } from '../../../contract';
import { MEASUREMENT_INFO } from '../../../measurements';
import type { CapabilityQuery } from '../../../schemas/stats';
import { today } from '../../../domain/days';
import { unprocessable } from '../../errors';
import type { Conn } from '../../db/scope';
import { seriesKey } from '../../db/series';
import { readingsInTimeOrder, type FamilyRef, type TimedReading } from '../../queries/stats';
import { capability as capabilityOf, type CapabilityResult } from '../../stats';
import { echo, label, limitInfo, limitKey, limitsMap, resolveFamily, selection } from './selection';

/** The selection's final readings in time order, the limits in force and the answer's head. */
async function finalSeries(conn: Conn, shopId: string, q: CapabilityQuery) {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const fam = family as FamilyRef;
	const key = seriesKey(q.measurement, 'final', q.side);
	const asOf = q.to ?? today();
	const [rows, limits] = await Promise.all([
		readingsInTimeOrder(conn, shopId, selection(q, [key], fam)),
		limitsMap(conn, shopId, asOf, { familyIds: [fam.id], keys: [key] })
	]);
	const limit = limits.get(limitKey(fam.id, key)) ?? null;
	if (limit && limit.min !== null && limit.max !== null && !(limit.min < limit.max)) {
		throw unprocessable(`The final limits ${limit.min}–${limit.max} leave no tolerance, so capability cannot be computed.`);
	}
	const judge = (rs: TimedReading[]): CapabilityResult =>
		capabilityOf(
			rs.map((r) => r.value),
			{ lsl: limit?.min ?? null, usl: limit?.max ?? null },
			{ bounds: MEASUREMENT_INFO[q.measurement].bounds }
		);
	const head = {
		family: label(fam),
		side: q.side,
		stage: 'final' as const,
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		limits: limitInfo(limit),
		limitsAsOf: asOf
	};
	return { rows, judge, head };
}

export async function capabilityStudy(conn: Conn, shopId: string, q: CapabilityQuery): Promise<CapabilityResponse> {
	const { rows, judge, head } = await finalSeries(conn, shopId, q);
	return { ...head, ...judge(rows) };
}

/** Capability per machinist: each one's own final readings in time order, judged alone. */
export async function capabilityByMachinist(conn: Conn, shopId: string, q: CapabilityQuery): Promise<CapabilityMachinistsResponse> {
	const { rows, judge, head } = await finalSeries(conn, shopId, q);
	const byMachinist = new Map<string, TimedReading[]>();
	for (const r of rows) {
		const list = byMachinist.get(r.measuredBy);
		if (list) list.push(r);
		else byMachinist.set(r.measuredBy, [r]);
	}
	const machinists = [...byMachinist.keys()]
		.sort((a, b) => a.localeCompare(b, 'en'))
		.map((machinist) => {
			const { histogram: _h, fit: _f, ...c } = judge(byMachinist.get(machinist)!);
			return { machinist, ...c };
		});
	return { ...head, machinists };
}
