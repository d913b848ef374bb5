// Least-squares straight line (e.g. wear against mileage) with the confidence band of the mean.
//
// Slope and intercept come from simple-statistics 7.12.1 `linearRegression`, which centres on
// the means before accumulating cross products (it matches NIST StRD Norris to ~1e-13, see
// regression.spec.ts). Residual SD, R², standard errors and the band are computed here from
// centred sums; the t quantile comes from @stdlib.

import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import { linearRegression } from 'simple-statistics';
import { finiteArray, type Values } from './input';
import { momentsOf } from './summary';

export interface BandPoint {
	x: number;
	/** Fitted mean ŷ(x) = intercept + slope·x. */
	fit: number;
	/** Lower and upper confidence limits for the mean of y at x. */
	low: number;
	high: number;
}

export interface LinearFit {
	n: number;
	/** null when fewer than two points or all x are equal. */
	slope: number | null;
	intercept: number | null;
	/** 1 − RSS/Σ(y − ȳ)²; null when all y are equal or the line is undefined. */
	r2: number | null;
	/** √(RSS/(n − 2)); null for n < 3. */
	residualSd: number | null;
	/** Standard errors of slope and intercept; null for n < 3. */
	slopeSe: number | null;
	interceptSe: number | null;
	/** Residual degrees of freedom, n − 2 (0 if negative). */
	df: number;
	/** Confidence level of `band`, e.g. 0.95. */
	level: number;
	/**
	 * Confidence interval of the mean response at x:
	 * ŷ ± t_{1−α/2, n−2} · s · √(1/n + (x − x̄)²/Sxx). Null for n < 3 or an undefined line.
	 */
	band: (x: number) => BandPoint | null;
}

/** Ordinary least-squares fit of ys on xs (paired by index). */
export function linearFit(xs: Values, ys: Values, level = 0.95): LinearFit {
	const x = finiteArray(xs, 'xs');
	const y = finiteArray(ys, 'ys');
	if (x.length !== y.length) throw new RangeError(`xs and ys differ in length (${x.length} vs ${y.length})`);
	if (!(level > 0 && level < 1)) throw new RangeError('level must be between 0 and 1');
	const n = x.length;
	const df = Math.max(0, n - 2);
	const none: LinearFit = {
		n,
		slope: null,
		intercept: null,
		r2: null,
		residualSd: null,
		slopeSe: null,
		interceptSe: null,
		df,
		level,
		band: () => null
	};
	if (n < 2) return none;

	const mx = momentsOf(x);
	const my = momentsOf(y);
	const sxx = mx.m2;
	const syy = my.m2;
	if (!(sxx > 0)) return none;

	const { m: slope, b: intercept } = linearRegression(x.map((xi, i) => [xi, y[i]]));

	let rss = 0;
	for (let i = 0; i < n; i++) {
		const r = y[i] - (intercept + slope * x[i]);
		rss += r * r;
	}
	const r2 = syy > 0 ? Math.min(1, Math.max(0, 1 - rss / syy)) : null;
	if (n < 3) {
		return { ...none, slope, intercept, r2 };
	}
	const s = Math.sqrt(rss / df);
	const xbar = mx.mean;
	const t = tQuantile(1 - (1 - level) / 2, df);
	const band = (x0: number): BandPoint | null => {
		if (!Number.isFinite(x0)) return null;
		const fit = intercept + slope * x0;
		const half = t * s * Math.sqrt(1 / n + ((x0 - xbar) * (x0 - xbar)) / sxx);
		return { x: x0, fit, low: fit - half, high: fit + half };
	};
	return {
		n,
		slope,
		intercept,
		r2,
		residualSd: s,
		slopeSe: s / Math.sqrt(sxx),
		interceptSe: s * Math.sqrt(1 / n + (xbar * xbar) / sxx),
		df,
		level,
		band
	};
}
