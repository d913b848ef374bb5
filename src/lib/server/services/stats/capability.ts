// Process capability (Cp, Cpk from moving ranges; Pp, Ppk overall) of final readings against
// the final limits in force.
import type { CapabilityResponse } from '../../../contract';
import { MEASUREMENT_INFO } from '../../../measurements';
import type { CapabilityQuery } from '../../../schemas/stats';
import { today } from '../../../domain/days';
import { unprocessable } from '../../errors';
import type { Conn } from '../../db/scope';
import { seriesKey } from '../../db/series';
import { readingsInTimeOrder, type FamilyRef } from '../../queries/stats';
import { capability as capabilityOf } from '../../stats';
import { echo, label, limitInfo, limitKey, limitsMap, resolveFamily, selection } from './selection';

export async function capabilityStudy(conn: Conn, shopId: string, q: CapabilityQuery): Promise<CapabilityResponse> {
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
	const c = capabilityOf(
		rows.map((r) => r.value),
		{ lsl: limit?.min ?? null, usl: limit?.max ?? null }
	);
	return {
		family: label(fam),
		side: q.side,
		stage: 'final',
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		limits: limitInfo(limit),
		limitsAsOf: asOf,
		...c
	};
}
