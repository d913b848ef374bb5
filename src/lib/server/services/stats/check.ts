// One reading against its family's limits and fleet, with the decision it suggests.
import type { CheckResponse } from '../../../contract';
import { MEASUREMENT_INFO, toCanonical, unitFits } from '../../../measurements';
import type { CheckQuery } from '../../../schemas/stats';
import { today } from '../../../domain/days';
import { invalid } from '../../errors';
import type { Conn } from '../../db/scope';
import { seriesKey } from '../../db/series';
import { groupData, type FamilyRef } from '../../queries/stats';
import { expandCounts, modifiedZ, outlierReasons, percentileRank, robustOfSorted, tukeyFlag } from '../../stats';
import { CAUTION, suggestDecision } from '../decision-rules';
import { label, limitInfo, limitKey, limitsMap, resolveFamily, selection } from './selection';

export async function checkReading(conn: Conn, shopId: string, q: CheckQuery): Promise<CheckResponse> {
	const info = MEASUREMENT_INFO[q.measurement];
	const unit = q.unit ?? info.unit;
	if (!unitFits(q.measurement, unit)) {
		throw invalid(`unit ${unit} does not fit ${q.measurement}; use ${info.units.join(' or ')}`);
	}
	const value = toCanonical(q.value, unit);
	if (value > info.max) throw invalid(`value ${value} ${info.unit} is beyond any plausible ${info.label.toLowerCase()} (at most ${info.max})`);
	const { family } = await resolveFamily(conn, shopId, q.family);
	const fam = family as FamilyRef;
	const key = seriesKey(q.measurement, q.stage, q.side);
	const [{ groups }, limits] = await Promise.all([
		groupData(conn, shopId, selection({}, [key], fam), { moments: false }),
		limitsMap(conn, shopId, today(), { familyIds: [fam.id], keys: [key, seriesKey(q.measurement, 'final', q.side)] })
	]);
	const limit = limits.get(limitKey(fam.id, key)) ?? null;
	const rework = q.stage === 'as_received' ? (limits.get(limitKey(fam.id, seriesKey(q.measurement, 'final', q.side))) ?? null) : null;
	const sorted = groups[0] ? expandCounts(groups[0].counts) : [];
	const fleet = robustOfSorted(sorted);
	const { median, mad, fences } = fleet;
	const over = limit?.max != null && value > limit.max;
	const under = limit?.min != null && value < limit.min;
	const rank = percentileRank(sorted, value);
	return {
		family: label(fam),
		side: q.side,
		stage: q.stage,
		measurement: q.measurement,
		entered: { value: q.value, unit },
		value,
		unit: info.unit,
		limits: limitInfo(limit),
		withinLimits: limit ? !(over || under) : null,
		broken: over ? 'max' : under ? 'min' : null,
		fleet,
		percentile: rank === null ? null : 100 * rank,
		robustZ: modifiedZ(value, median, mad),
		tukey: tukeyFlag(value, fences),
		reasons: outlierReasons({ value, limits: { min: limit?.min, max: limit?.max }, fences, median, mad, decimals: info.decimals }),
		suggestion: suggestDecision(q.measurement, q.stage, value, limit, rework),
		caution: CAUTION
	};
}
