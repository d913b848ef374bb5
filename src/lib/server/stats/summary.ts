// Descriptive statistics for one series of measurements.
//
// Mean and variance: streaming updates use Welford's one-pass recurrence (`addValue`) and,
// for merging partial results, the pairwise update of Chan, Golub & LeVeque (`mergeMoments`).
// A whole in-memory series (`momentsOf`, `describe`) adds the corrected second pass of the
// same authors. The textbook Σx² − n·x̄² form is never used: on NIST StRD NumAcc3/NumAcc4
// it loses every digit.
//
// Quantiles are Hyndman & Fan (1996) type 7 everywhere (R's default, Excel PERCENTILE.INC,
// PostgreSQL percentile_cont). simple-statistics 7.12.1 `quantileSorted` implements exactly
// that definition (index (n − 1)·p, linear interpolation); summary.spec.ts pins it to the
// published worked examples, so it is used rather than re-implemented. Older
// simple-statistics releases used a different rule, so the spec is the guard if it is upgraded.

import { medianAbsoluteDeviation, quantileSorted } from 'simple-statistics';
import { finiteArray, type Values } from './input';

/** Running moments of a series: count, mean, sum of squared deviations, extremes. */
export interface Moments {
	n: number;
	mean: number;
	/** Σ (x − mean)², the second central moment times n. */
	m2: number;
	min: number | null;
	max: number | null;
}

export interface MomentsSummary {
	n: number;
	mean: number | null;
	/** Sample variance (n − 1 divisor). */
	variance: number | null;
	/** Sample standard deviation (n − 1 divisor). */
	sd: number | null;
	min: number | null;
	max: number | null;
}

export interface Quantiles {
	p05: number | null;
	p25: number | null;
	p50: number | null;
	p75: number | null;
	p95: number | null;
}

export interface Fences {
	low: number | null;
	high: number | null;
}

/** One histogram bin: [x0, x1) except the last, which is [x0, x1]. */
export interface HistogramBin {
	x0: number;
	x1: number;
	count: number;
}

export interface Summary {
	n: number;
	mean: number | null;
	/** Sample standard deviation (n − 1 divisor); null for n < 2. */
	sd: number | null;
	min: number | null;
	max: number | null;
	quantiles: Quantiles;
	/** Q3 − Q1 (type 7). */
	iqr: number | null;
	/** Raw median absolute deviation, median |x − median|. */
	mad: number | null;
	/** 1.4826 · mad, consistent for σ under normality (R `mad()` default). */
	madScaled: number | null;
	/** Tukey's inner fences Q1 − 1.5·IQR, Q3 + 1.5·IQR. */
	fences: Fences;
	histogram: HistogramBin[];
	/** NIST StRD lag-1 autocorrelation; null for n < 2 or zero spread. */
	lag1Autocorrelation: number | null;
}

/** Scale factor from raw MAD to a σ estimate: 1/Φ⁻¹(3/4), as in R `mad(constant = 1.4826)`. */
export const MAD_SCALE = 1.4826;
/** Tukey's inner-fence multiplier. */
export const TUKEY_K = 1.5;
export const HISTOGRAM_MIN_BINS = 5;
export const HISTOGRAM_MAX_BINS = 60;

// ---------------------------------------------------------------- moments

/** Neumaier's improved Kahan summation (Neumaier 1974). */
class CompensatedSum {
	private sum = 0;
	private c = 0;
	add(x: number): void {
		const t = this.sum + x;
		this.c += Math.abs(this.sum) >= Math.abs(x) ? this.sum - t + x : x - t + this.sum;
		this.sum = t;
	}
	value(): number {
		return this.sum + this.c;
	}
}

export function emptyMoments(): Moments {
	return { n: 0, mean: 0, m2: 0, min: null, max: null };
}

/** Welford's update: the moments of the series with `x` appended. Does not mutate `m`. */
export function addValue(m: Moments, x: number): Moments {
	if (!Number.isFinite(x)) throw new RangeError('addValue: x is not a finite number');
	const n = m.n + 1;
	const delta = x - m.mean;
	const mean = m.mean + delta / n;
	return {
		n,
		mean,
		m2: m.m2 + delta * (x - mean),
		min: m.min === null || x < m.min ? x : m.min,
		max: m.max === null || x > m.max ? x : m.max
	};
}

/**
 * Moments of a whole series held in memory. A Welford pass gives the mean; a second
 * pass applies the corrected two-pass formula of Chan, Golub & LeVeque (1983):
 * with d = x − mean, M2 = Σd² − (Σd)²/n and mean += Σd/n. Welford alone is stable but
 * leaves ~1e-12 relative error on NIST Mavro/Michelso, above GSL's 1e-13 tolerance;
 * the second pass brings it to ~1e-15. Streaming callers use `addValue`/`mergeMoments`.
 */
export function momentsOf(values: Values): Moments {
	const data = finiteArray(values);
	const n = data.length;
	if (n === 0) return emptyMoments();
	let mean = 0;
	let min = data[0];
	let max = data[0];
	for (let i = 0; i < n; i++) {
		const x = data[i];
		mean += (x - mean) / (i + 1);
		if (x < min) min = x;
		if (x > max) max = x;
	}
	// Second pass with Neumaier-compensated sums, so that adding up ~n equal squares does
	// not itself cost log2(n) bits (NumAcc2 needs 1e-15).
	const sumD = new CompensatedSum();
	const sumD2 = new CompensatedSum();
	for (const x of data) {
		const d = x - mean;
		sumD.add(d);
		sumD2.add(d * d);
	}
	const sd = sumD.value();
	return { n, mean: mean + sd / n, m2: Math.max(0, sumD2.value() - (sd * sd) / n), min, max };
}

/**
 * Moments of the concatenation of two series, from their separate moments
 * (Chan, Golub & LeVeque parallel update): δ = mean_b − mean_a,
 * mean = mean_a + δ·n_b/n, M2 = M2_a + M2_b + δ²·n_a·n_b/n.
 */
export function mergeMoments(a: Moments, b: Moments): Moments {
	if (a.n === 0) return { ...b };
	if (b.n === 0) return { ...a };
	const n = a.n + b.n;
	const delta = b.mean - a.mean;
	return {
		n,
		mean: a.mean + delta * (b.n / n),
		m2: a.m2 + b.m2 + delta * delta * ((a.n * b.n) / n),
		min: Math.min(a.min as number, b.min as number),
		max: Math.max(a.max as number, b.max as number)
	};
}

export function momentsToSummary(m: Moments): MomentsSummary {
	const variance = m.n >= 2 ? Math.max(0, m.m2) / (m.n - 1) : null;
	return {
		n: m.n,
		mean: m.n >= 1 ? m.mean : null,
		variance,
		sd: variance === null ? null : Math.sqrt(variance),
		min: m.n >= 1 ? m.min : null,
		max: m.n >= 1 ? m.max : null
	};
}

// ---------------------------------------------------------------- quantiles

/**
 * Hyndman & Fan type-7 quantile of already-sorted (ascending) values:
 * h = (n − 1)·p, Q = x[⌊h⌋] + (h − ⌊h⌋)·(x[⌊h⌋+1] − x[⌊h⌋]) (0-based).
 * Returns null for an empty array; throws for p outside [0, 1].
 */
export function quantileType7(sorted: Values, p: number): number | null {
	if (!(p >= 0 && p <= 1)) throw new RangeError(`quantile probability must be in [0, 1], got ${p}`);
	if (sorted.length === 0) return null;
	return quantileSorted(sorted as readonly number[], p);
}

// ---------------------------------------------------------------- autocorrelation

/**
 * Lag-1 autocorrelation as NIST StRD defines it:
 * r(1) = Σ_{i=2..n} (y_i − ȳ)(y_{i−1} − ȳ) / Σ_{i=1..n} (y_i − ȳ)².
 * `values` must be in time order. Null for n < 2 or when all values are equal.
 */
export function lag1Autocorrelation(values: Values, mean?: number): number | null {
	const y = finiteArray(values);
	if (y.length < 2) return null;
	const ybar = mean ?? momentsOf(y).mean;
	let num = 0;
	let den = 0;
	let prev = y[0] - ybar;
	den += prev * prev;
	for (let i = 1; i < y.length; i++) {
		const d = y[i] - ybar;
		num += d * prev;
		den += d * d;
		prev = d;
	}
	return den > 0 ? num / den : null;
}

// ---------------------------------------------------------------- histogram

/**
 * Histogram of sorted values with the Freedman–Diaconis bin width h = 2·IQR·n^(−1/3)
 * (IQR type 7), number of bins ⌈range/h⌉ clamped to [5, 60]; an IQR of 0 with a
 * non-zero range gives the maximum (60). Bins are equal-width from min to max,
 * half-open [x0, x1) except the last, which also holds max. All-equal values give
 * one bin [v, v]; no values give [].
 */
export function histogramSorted(sorted: readonly number[]): HistogramBin[] {
	const n = sorted.length;
	if (n === 0) return [];
	const min = sorted[0];
	const max = sorted[n - 1];
	if (min === max) return [{ x0: min, x1: max, count: n }];
	const iqr = (quantileType7(sorted, 0.75) as number) - (quantileType7(sorted, 0.25) as number);
	const h = (2 * iqr) / Math.cbrt(n);
	const raw = h > 0 ? Math.ceil((max - min) / h) : HISTOGRAM_MAX_BINS;
	const k = Math.min(HISTOGRAM_MAX_BINS, Math.max(HISTOGRAM_MIN_BINS, raw));
	const width = (max - min) / k;
	const edges = Array.from({ length: k + 1 }, (_, i) => (i === k ? max : min + i * width));
	const bins: HistogramBin[] = Array.from({ length: k }, (_, i) => ({
		x0: edges[i],
		x1: edges[i + 1],
		count: 0
	}));
	for (const x of sorted) {
		let i = Math.min(k - 1, Math.max(0, Math.floor((x - min) / width)));
		// Guard against rounding in (x − min)/width: honour the stored edges exactly.
		while (i > 0 && x < edges[i]) i--;
		while (i < k - 1 && x >= edges[i + 1]) i++;
		bins[i].count++;
	}
	return bins;
}

// ---------------------------------------------------------------- describe

const EMPTY_QUANTILES: Quantiles = { p05: null, p25: null, p50: null, p75: null, p95: null };

/** The summary of no readings: every figure null, no histogram (describe adds its r(1)). */
export function emptySummary(): Omit<Summary, 'lag1Autocorrelation'> {
	return {
		n: 0,
		mean: null,
		sd: null,
		min: null,
		max: null,
		quantiles: { ...EMPTY_QUANTILES },
		iqr: null,
		mad: null,
		madScaled: null,
		fences: { low: null, high: null },
		histogram: []
	};
}

/** Full descriptive summary of one series; `values` in time order (for r(1)). */
export function describe(values: Values): Summary {
	const data = finiteArray(values);
	const m = momentsOf(data);
	const s = momentsToSummary(m);
	if (data.length === 0) return { ...emptySummary(), lag1Autocorrelation: null };
	const sorted = [...data].sort((a, b) => a - b);
	const q = (p: number) => quantileType7(sorted, p) as number;
	const quantiles: Quantiles = { p05: q(0.05), p25: q(0.25), p50: q(0.5), p75: q(0.75), p95: q(0.95) };
	const iqr = (quantiles.p75 as number) - (quantiles.p25 as number);
	// simple-statistics medianAbsoluteDeviation = median |x − median| with the type-7 median,
	// i.e. R mad(x, constant = 1).
	const mad = medianAbsoluteDeviation(sorted);
	return {
		n: s.n,
		mean: s.mean,
		sd: s.sd,
		min: s.min,
		max: s.max,
		quantiles,
		iqr,
		mad,
		madScaled: MAD_SCALE * mad,
		fences: {
			low: (quantiles.p25 as number) - TUKEY_K * iqr,
			high: (quantiles.p75 as number) + TUKEY_K * iqr
		},
		histogram: histogramSorted(sorted),
		lag1Autocorrelation: lag1Autocorrelation(data, m.mean)
	};
}
