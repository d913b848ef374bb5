// Shares of valve positions or heads: Wilson score intervals, the Newcombe and the
// Miettinen–Nurminen intervals for a difference of two shares, the Miettinen–Nurminen score
// test, Fisher's exact test and Pearson's chi-square test for 2×2 tables.
//
// Distributions come from @stdlib (hypergeometric pmf, chi-square cdf, erfc); nothing here
// evaluates a distribution by its own series.

import erfc from '@stdlib/math-base-special-erfc';
import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import hypergeometricPmf from '@stdlib/stats-base-dists-hypergeometric-pmf';
import { assertCount } from './input';

/** Φ⁻¹(0.975) to 7 significant digits, as Newcombe (1998) uses for 95 % intervals. */
export const Z95 = 1.959964;

export interface WilsonInterval {
	/** x/n; null when n = 0. */
	rate: number | null;
	low: number | null;
	high: number | null;
}

/**
 * Wilson (1927) score interval for a binomial proportion x/n:
 * (p̂ + z²/2n ± z·√(p̂(1 − p̂)/n + z²/4n²)) / (1 + z²/n).
 * n = 0 gives nulls. The bounds are exactly 0 at x = 0 and 1 at x = n.
 */
export function wilson(x: number, n: number, z: number = Z95): WilsonInterval {
	assertCount(x, 'x');
	assertCount(n, 'n');
	if (x > n) throw new RangeError(`x (${x}) cannot exceed n (${n})`);
	if (!(z > 0) || !Number.isFinite(z)) throw new RangeError('z must be a positive number');
	if (n === 0) return { rate: null, low: null, high: null };
	const p = x / n;
	const z2 = z * z;
	const denom = 1 + z2 / n;
	const centre = (p + z2 / (2 * n)) / denom;
	const half = (z * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n))) / denom;
	return {
		rate: p,
		low: x === 0 ? 0 : Math.max(0, centre - half),
		high: x === n ? 1 : Math.min(1, centre + half)
	};
}

export interface DifferenceInterval {
	/** x1/n1 − x2/n2; null when either n is 0. */
	difference: number | null;
	low: number | null;
	high: number | null;
}

/**
 * Newcombe (1998, Stat Med 17:873–890) method 10 interval for p1 − p2: the hybrid score
 * interval built from the two Wilson intervals (l_i, u_i):
 * low = d − √((p1 − l1)² + (u2 − p2)²), high = d + √((u1 − p1)² + (p2 − l2)²).
 */
export function newcombeDifference(
	x1: number,
	n1: number,
	x2: number,
	n2: number,
	z: number = Z95
): DifferenceInterval {
	const a = wilson(x1, n1, z);
	const b = wilson(x2, n2, z);
	if (a.rate === null || b.rate === null) return { difference: null, low: null, high: null };
	const [p1, l1, u1] = [a.rate, a.low as number, a.high as number];
	const [p2, l2, u2] = [b.rate, b.low as number, b.high as number];
	const d = p1 - p2;
	return {
		difference: d,
		low: d - Math.sqrt((p1 - l1) ** 2 + (u2 - p2) ** 2),
		high: d + Math.sqrt((u1 - p1) ** 2 + (p2 - l2) ** 2)
	};
}

/** A 2×2 table [[a, b], [c, d]]: rows are the two groups, columns are (event, no event). */
export type Table2x2 = readonly [readonly [number, number], readonly [number, number]];

export interface FisherResult {
	/** Two-sided p: sum over tables with the same margins whose probability ≤ the observed one. */
	p: number;
	/** P(A ≤ a), the one-sided p for "odds ratio < 1" (R alternative = "less"). */
	pLess: number;
	/** P(A ≥ a), the one-sided p for "odds ratio > 1" (R alternative = "greater"). */
	pGreater: number;
	/** Sample odds ratio ad/bc; null when bc = 0 (infinite or undefined). */
	oddsRatio: number | null;
}

/** Relative tolerance on "probability ≤ observed", as R's fisher.test (1 + 1e-7). */
const FISHER_REL_TOL = 1e-7;

function checkTable(table: readonly (readonly number[])[]): void {
	if (table.length < 2 || table.some((row) => row.length !== table[0].length || row.length < 2)) {
		throw new RangeError('table must be rectangular, at least 2×2');
	}
	table.forEach((row, i) => row.forEach((v, j) => assertCount(v, `table[${i}][${j}]`)));
}

/**
 * Fisher's exact test for a 2×2 table, conditional on both margins. With the cell a
 * distributed hypergeometrically (population N, a + c "events", a + b drawn), the two-sided
 * p sums every table whose probability is ≤ the observed table's (times 1 + 1e-7), the
 * R `fisher.test` / SciPy `fisher_exact` convention — not twice the one-sided p.
 */
export function fisherExact2x2(table: Table2x2): FisherResult {
	checkTable(table);
	const [[a, b], [c, d]] = table;
	const N = a + b + c + d;
	const row1 = a + b;
	const col1 = a + c;
	const lo = Math.max(0, row1 + col1 - N);
	const hi = Math.min(row1, col1);
	const pmf = (k: number) => hypergeometricPmf(k, N, col1, row1);
	const observed = pmf(a);
	const cutoff = observed * (1 + FISHER_REL_TOL);
	let p = 0;
	let pLess = 0;
	let pGreater = 0;
	for (let k = lo; k <= hi; k++) {
		const pk = pmf(k);
		if (pk <= cutoff) p += pk;
		if (k <= a) pLess += pk;
		if (k >= a) pGreater += pk;
	}
	return {
		p: Math.min(1, p),
		pLess: Math.min(1, pLess),
		pGreater: Math.min(1, pGreater),
		oddsRatio: b * c === 0 ? null : (a * d) / (b * c)
	};
}

export interface ChiSquareResult {
	/** Pearson X² = Σ (O − E)²/E, no continuity correction; null if a margin is 0. */
	statistic: number | null;
	df: number;
	/** Upper-tail p from the chi-square distribution; null with the statistic. */
	p: number | null;
	/** Expected counts E_ij = row_i · col_j / N; null when N = 0. */
	expected: number[][] | null;
}

/** Pearson's chi-square test of independence for an r×c table of counts (no Yates correction). */
export function chiSquareTest(table: readonly (readonly number[])[]): ChiSquareResult {
	checkTable(table);
	const rows = table.map((r) => r.reduce((s, v) => s + v, 0));
	const cols = table[0].map((_, j) => table.reduce((s, r) => s + r[j], 0));
	const N = rows.reduce((s, v) => s + v, 0);
	const df = (rows.length - 1) * (cols.length - 1);
	if (N === 0) return { statistic: null, df, p: null, expected: null };
	const expected = rows.map((r) => cols.map((c) => (r * c) / N));
	if (rows.some((r) => r === 0) || cols.some((c) => c === 0)) {
		return { statistic: null, df, p: null, expected };
	}
	let x2 = 0;
	table.forEach((row, i) =>
		row.forEach((o, j) => {
			const e = expected[i][j];
			x2 += ((o - e) * (o - e)) / e;
		})
	);
	return { statistic: x2, df, p: Math.min(1, Math.max(0, 1 - chisquareCdf(x2, df))), expected };
}

/** Pearson's chi-square test for a 2×2 table, without Yates' correction (df = 1). */
export function chiSquare2x2(table: Table2x2): ChiSquareResult {
	return chiSquareTest(table);
}

/**
 * The smallest p-value given as computed. Below it the normal tail of an asymptotic test says
 * nothing more (its own approximation error is larger), and far enough out it underflows to 0:
 * such a p is reported as this bound, with `pBelow` set, and read "p < 1e-15".
 */
export const P_FLOOR = 1e-15;

/**
 * Maximum-likelihood estimates of p1 and p2 under the constraint p1 − p2 = δ, for x1/n1 and
 * x2/n2: the one root in range of the likelihood equations' cubic, in the closed form of
 * Farrington & Manning (1990, Stat Med 9:1447–1454, §2), which Miettinen & Nurminen (1985,
 * Stat Med 4:213–226, Appendix 1) solve the same way.
 */
export function restrictedMle(x1: number, n1: number, x2: number, n2: number, delta: number): [number, number] {
	const t = n2 / n1;
	const a = 1 + t;
	const b = -(1 + t + x1 / n1 + t * (x2 / n2) + delta * (t + 2));
	const c = delta * delta + delta * (2 * (x1 / n1) + t + 1) + x1 / n1 + t * (x2 / n2);
	const d = -(x1 / n1) * delta * (1 + delta);
	const v = b ** 3 / (3 * a) ** 3 - (b * c) / (6 * a * a) + d / (2 * a);
	const u = Math.sign(v) * Math.sqrt(Math.max(0, b ** 2 / (3 * a) ** 2 - c / (3 * a)));
	// u = 0 only at a triple root, where the root is −b/3a; rounding can push v/u³ past ±1.
	const w = u === 0 ? Math.PI / 2 : (Math.PI + Math.acos(Math.min(1, Math.max(-1, v / u ** 3)))) / 3;
	const p1 = Math.min(1, Math.max(0, 2 * u * Math.cos(w) - b / (3 * a)));
	const p2 = Math.min(1, Math.max(0, p1 - delta));
	return [p1, p2];
}

/**
 * Miettinen & Nurminen's (1985) score statistic for H0: p1 − p2 = δ,
 * z = (p̂1 − p̂2 − δ) / √V, V = [p̃1(1 − p̃1)/n1 + p̃2(1 − p̃2)/n2] · N/(N − 1), with p̃ the
 * restricted estimates. V = 0 (a boundary δ) gives 0 when the numerator is 0, else ±∞.
 */
export function mnStatistic(x1: number, n1: number, x2: number, n2: number, delta: number): number {
	const num = x1 / n1 - x2 / n2 - delta;
	const [p1, p2] = restrictedMle(x1, n1, x2, n2, delta);
	const N = n1 + n2;
	const v = ((p1 * (1 - p1)) / n1 + (p2 * (1 - p2)) / n2) * (N / (N - 1));
	if (Math.abs(num) < 1e-15) return 0;
	return v > 0 ? num / Math.sqrt(v) : num > 0 ? Infinity : -Infinity;
}

/** Two-sided normal p of a z statistic, 2Φ(−|z|) = erfc(|z|/√2), before any floor. */
const twoSided = (z: number) => erfc(Math.abs(z) / Math.SQRT2);

export interface ScoreDifference {
	/** x1/n1 − x2/n2; null when either n is 0 (and every field below with it). */
	difference: number | null;
	/** The confidence interval: every δ the test below does not reject at 1 − level. */
	low: number | null;
	high: number | null;
	/** The score statistic z at δ = 0. */
	statistic: number | null;
	/** Two-sided p of δ = 0; never 0: at most P_FLOOR when `pBelow`. */
	p: number | null;
	/** The computed p is below P_FLOOR; `p` holds the bound. */
	pBelow: boolean;
	/** From the interval: 'higher' when it lies above 0 (p1 > p2), 'lower' below, else 'unclear'. */
	verdict: 'higher' | 'lower' | 'unclear' | null;
}

/**
 * The Miettinen–Nurminen (1985) score test of p1 − p2 = 0 and the interval obtained by
 * inverting the same test: {δ : p(δ) ≥ 1 − level}, found by bisection on each side of the
 * estimate. Each search first tests δ = 0 when 0 lies in its bracket, and returns the accepted
 * end of its bracket, so the interval excludes 0 exactly when p(0) < 1 − level: the verdict,
 * taken from the interval, can never contradict the p-value (the test is the interval's own).
 * Newcombe (1998b, method 6) found this interval's coverage close to nominal.
 */
export function mnDifference(x1: number, n1: number, x2: number, n2: number, level = 0.95): ScoreDifference {
	assertCount(x1, 'x1');
	assertCount(n1, 'n1');
	assertCount(x2, 'x2');
	assertCount(n2, 'n2');
	if (x1 > n1 || x2 > n2) throw new RangeError('a count of events cannot exceed its n');
	if (!(level > 0 && level < 1)) throw new RangeError('level must be between 0 and 1');
	if (n1 === 0 || n2 === 0) return { difference: null, low: null, high: null, statistic: null, p: null, pBelow: false, verdict: null };
	const alpha = 1 - level;
	const d = x1 / n1 - x2 / n2;
	const pAt = (delta: number) => twoSided(mnStatistic(x1, n1, x2, n2, delta));
	const accepted = (delta: number) => pAt(delta) >= alpha;
	/** Bisection between a rejected and an accepted δ; returns the accepted end. */
	const edge = (rejected: number, inside: number): number => {
		if (rejected < 0 !== inside < 0 && rejected !== 0 && inside !== 0) {
			if (accepted(0)) inside = 0;
			else rejected = 0;
		}
		for (let i = 0; i < 200 && Math.abs(inside - rejected) > 1e-12; i++) {
			const mid = (inside + rejected) / 2;
			if (accepted(mid)) inside = mid;
			else rejected = mid;
		}
		return inside;
	};
	const low = d <= -1 || accepted(-1) ? -1 : edge(-1, d);
	const high = d >= 1 || accepted(1) ? 1 : edge(1, d);
	const z0 = mnStatistic(x1, n1, x2, n2, 0);
	const raw = twoSided(z0);
	const pBelow = raw < P_FLOOR;
	return {
		difference: d,
		low,
		high,
		statistic: z0,
		p: pBelow ? P_FLOOR : Math.min(1, raw),
		pBelow,
		verdict: low > 0 ? 'higher' : high < 0 ? 'lower' : 'unclear'
	};
}

export interface ProportionComparison extends ScoreDifference {
	rate1: WilsonInterval;
	rate2: WilsonInterval;
}

/**
 * Compares two shares x1/n1 and x2/n2: each with its Wilson interval, their difference with
 * the Miettinen–Nurminen score test and the interval that inverts it (mnDifference).
 */
export function compareProportions(x1: number, n1: number, x2: number, n2: number, z: number = Z95): ProportionComparison {
	return { rate1: wilson(x1, n1, z), rate2: wilson(x2, n2, z), ...mnDifference(x1, n1, x2, n2) };
}
