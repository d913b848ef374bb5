// Where one reading sits in its fleet, and why it may be an outlier.
//
// - Modified z-score (Iglewicz & Hoaglin 1993): M = 0.6745·(x − median)/MAD, with the raw
//   MAD = median |x − median|; |M| > 3.5 marks a potential outlier. 0.6745 = Φ⁻¹(3/4).
// - Tukey's inner fences (Tukey 1977): Q1 − 1.5·IQR and Q3 + 1.5·IQR, type-7 quartiles.
// - Percentile rank with mid-ranks for ties (see percentileRank).

import { quantileRankSorted } from 'simple-statistics';
import { fixedApart } from '../../measurements';
import type { Fences } from './summary';
import type { Values } from './input';
import { MODIFIED_Z_THRESHOLD, modifiedZ } from '../../domain/robust';

// The modified z-score is shared with the browser's entry grid ($lib/domain/robust).
export { MODIFIED_Z_FACTOR, MODIFIED_Z_THRESHOLD, modifiedZ } from '../../domain/robust';

/** 'low' below Q1 − 1.5·IQR, 'high' above Q3 + 1.5·IQR, otherwise null. Fences are exclusive. */
export function tukeyFlag(x: number, fences: Fences): 'low' | 'high' | null {
	if (fences.low !== null && x < fences.low) return 'low';
	if (fences.high !== null && x > fences.high) return 'high';
	return null;
}

/**
 * Percentile rank of `x` among `sortedValues` (ascending), as a share in [0, 1]
 * (multiply by 100 for a percentile).
 *
 * Definition (mid-rank for ties): with B values strictly below x and E values equal to x,
 * - if x is not in the data (E = 0): B/n, the share of values ≤ x;
 * - otherwise: the mean of the 1-based ranks x occupies divided by n, (B + (E + 1)/2)/n.
 *   With no ties (E = 1) that is (B + 1)/n, again the share of values ≤ x; with ties it is
 *   the midpoint of the tied block, so equal readings all get the same, central rank.
 * This is simple-statistics `quantileRankSorted`, which is used as-is.
 * Null for an empty fleet. `sortedValues` must already be sorted ascending.
 */
export function percentileRank(sortedValues: Values, x: number): number | null {
	if (!Number.isFinite(x)) throw new RangeError('percentileRank: x is not a finite number');
	if (sortedValues.length === 0) return null;
	return quantileRankSorted(sortedValues as number[], x);
}

export type OutlierCode = 'below_limit' | 'above_limit' | 'tukey_low' | 'tukey_high' | 'modified_z';

export interface OutlierReason {
	code: OutlierCode;
	text: string;
}

export interface OutlierInput {
	value: number;
	/** The family's published limits; either may be absent. Limits are inclusive. */
	limits: { min?: number | null; max?: number | null };
	fences: Fences;
	median: number | null;
	/** Raw MAD (not scaled by 1.4826). */
	mad: number | null;
	/** The measurement's usual decimals: readings and limits are written with them, fences and
	 * the median (summaries) with one more. Without it, 6 significant digits. */
	decimals?: number;
}

/** Rounds for display in reason texts: 6 significant digits, no trailing zeros. */
function sig6(x: number): string {
	return String(Number(x.toPrecision(6)));
}

/**
 * Every reason the value stands out, in a fixed order: limits, then Tukey fences, then
 * the modified z-score. An empty array means nothing flags it.
 */
export function outlierReasons(input: OutlierInput): OutlierReason[] {
	const { value, limits, fences, median, mad, decimals } = input;
	// The value against what it is compared with: never printed equal to it.
	const fmt: (x: number, against?: number | null) => string = decimals === undefined ? sig6 : (x, against) => fixedApart(x, against, decimals);
	const fmtSummary = decimals === undefined ? sig6 : (x: number) => x.toFixed(decimals + 1);
	if (!Number.isFinite(value)) throw new RangeError('outlierReasons: value is not a finite number');
	const out: OutlierReason[] = [];
	const min = limits.min ?? null;
	const max = limits.max ?? null;
	if (min !== null && value < min) {
		out.push({ code: 'below_limit', text: `${fmt(value, min)} is below the lower limit ${fmt(min)}.` });
	}
	if (max !== null && value > max) {
		out.push({ code: 'above_limit', text: `${fmt(value, max)} is above the upper limit ${fmt(max)}.` });
	}
	const flag = tukeyFlag(value, fences);
	if (flag === 'low') {
		out.push({
			code: 'tukey_low',
			text: `${fmt(value, fences.low)} is below the low fence ${fmtSummary(fences.low as number)} (Q1 − 1.5 × IQR).`
		});
	} else if (flag === 'high') {
		out.push({
			code: 'tukey_high',
			text: `${fmt(value, fences.high)} is above the high fence ${fmtSummary(fences.high as number)} (Q3 + 1.5 × IQR).`
		});
	}
	const z = modifiedZ(value, median, mad);
	if (z !== null && Math.abs(z) > MODIFIED_Z_THRESHOLD) {
		out.push({
			code: 'modified_z',
			text: `Modified z-score ${z.toFixed(1)} is beyond ±${MODIFIED_Z_THRESHOLD} (far from the median ${fmtSummary(median as number)}).`
		});
	}
	return out;
}
