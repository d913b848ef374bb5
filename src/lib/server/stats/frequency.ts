// Summaries of a series held as a frequency table: (value, count) pairs. Readings are quantised
// at the gauge's resolution, so the database keeps them this way (reading_value_counts) and the
// table is far shorter than the series. Everything here expands the table to the sorted series it
// stands for and hands it to the functions in summary.ts, so a frequency table and the raw
// readings give identical results (frequency.spec.ts checks that against describe()).

import { medianAbsoluteDeviation } from 'simple-statistics';
import { assertCount } from './input';
import {
	emptySummary,
	histogramSorted,
	MAD_SCALE,
	momentsOf,
	momentsToSummary,
	quantileType7,
	TUKEY_K,
	type Moments,
	type Summary
} from './summary';

/** One row of a frequency table: a value and how many readings had it. */
export type ValueCount = readonly [value: number, count: number];

/** describe() without the lag-1 autocorrelation, which needs the readings in time order. */
export type FrequencySummary = Omit<Summary, 'lag1Autocorrelation'>;

/**
 * The ascending series a frequency table stands for. The table must be sorted by value, with
 * distinct finite values and non-negative whole counts (zero counts are skipped).
 */
export function expandCounts(counts: readonly ValueCount[]): number[] {
	let total = 0;
	for (let i = 0; i < counts.length; i++) {
		const [v, k] = counts[i];
		if (!Number.isFinite(v)) throw new RangeError(`counts[${i}] value is not a finite number`);
		assertCount(k, `counts[${i}] count`);
		if (i > 0 && !(v > counts[i - 1][0])) throw new RangeError('counts must be sorted by value, each value once');
		total += k;
	}
	const out = new Array<number>(total);
	let j = 0;
	for (const [v, k] of counts) for (let r = 0; r < k; r++) out[j++] = v;
	return out;
}

/** How many readings lie strictly below `low` and strictly above `high` (either may be null). */
export function countBeyond(counts: readonly ValueCount[], low: number | null, high: number | null): { below: number; above: number } {
	let below = 0;
	let above = 0;
	for (const [v, k] of counts) {
		if (low !== null && v < low) below += k;
		if (high !== null && v > high) above += k;
	}
	return { below, above };
}

export interface RobustSummary {
	n: number;
	median: number | null;
	/** Raw MAD, median |x − median|. */
	mad: number | null;
	fences: { low: number | null; high: number | null };
}

/** Median, MAD and Tukey's fences of an already-sorted series: what a single reading is judged by. */
export function robustOfSorted(sorted: readonly number[]): RobustSummary {
	if (sorted.length === 0) return { n: 0, median: null, mad: null, fences: { low: null, high: null } };
	const q1 = quantileType7(sorted, 0.25) as number;
	const q3 = quantileType7(sorted, 0.75) as number;
	const iqr = q3 - q1;
	return {
		n: sorted.length,
		median: quantileType7(sorted, 0.5),
		// R mad(x, constant = 1): median |x − median| with type-7 medians.
		mad: medianAbsoluteDeviation(sorted as number[]),
		fences: { low: q1 - TUKEY_K * iqr, high: q3 + TUKEY_K * iqr }
	};
}

/**
 * The summary of describe() from an already-sorted series, with the count, mean and SD taken
 * from `moments` when given (e.g. merged from stored per-month moments) instead of a new pass.
 */
export function summarizeSorted(sorted: readonly number[], moments?: Moments): FrequencySummary {
	const m = momentsToSummary(moments ?? momentsOf(sorted));
	const n = sorted.length;
	if (n === 0) return emptySummary();
	if (m.n !== n) throw new RangeError(`moments count ${m.n} does not match the series length ${n}`);
	const q = (p: number) => quantileType7(sorted, p) as number;
	const quantiles = { p05: q(0.05), p25: q(0.25), p50: q(0.5), p75: q(0.75), p95: q(0.95) };
	const iqr = quantiles.p75 - quantiles.p25;
	// R mad(x, constant = 1): median |x − median| with type-7 medians.
	const mad = medianAbsoluteDeviation(sorted as number[]);
	return {
		n,
		mean: m.mean,
		sd: m.sd,
		min: sorted[0],
		max: sorted[n - 1],
		quantiles,
		iqr,
		mad,
		madScaled: MAD_SCALE * mad,
		fences: { low: quantiles.p25 - TUKEY_K * iqr, high: quantiles.p75 + TUKEY_K * iqr },
		histogram: histogramSorted(sorted)
	};
}

/** summarizeSorted() of the series a frequency table stands for. */
export function summarizeCounts(counts: readonly ValueCount[], moments?: Moments): FrequencySummary {
	return summarizeSorted(expandCounts(counts), moments);
}
