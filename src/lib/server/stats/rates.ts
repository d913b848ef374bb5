// Failure rates: Wilson score intervals, the Newcombe interval for a difference of two
// rates, Fisher's exact test and Pearson's chi-square test for 2×2 tables.
//
// Distributions come from @stdlib (hypergeometric pmf, chi-square cdf); nothing here
// evaluates a distribution by its own series.

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

/** Expected counts below this send compareProportions to Fisher's exact test (Cochran's rule). */
export const MIN_EXPECTED_FOR_CHI_SQUARE = 5;

export interface ProportionComparison {
	test: 'fisher' | 'chi_square';
	/** Two-sided p of the chosen test. */
	p: number | null;
	/** Pearson X² when the chi-square test was used, else null. */
	statistic: number | null;
	df: number | null;
	/** Smallest expected cell count; null when there are no observations. */
	minExpected: number | null;
	rate1: WilsonInterval;
	rate2: WilsonInterval;
	/** rate1 − rate2 with Newcombe's method-10 interval. */
	difference: number | null;
	differenceLow: number | null;
	differenceHigh: number | null;
}

/**
 * Compares two failure rates x1/n1 and x2/n2. Uses Fisher's exact test when any expected
 * count of the 2×2 table is below 5, otherwise Pearson's chi-square (no continuity correction).
 */
export function compareProportions(
	x1: number,
	n1: number,
	x2: number,
	n2: number,
	z: number = Z95
): ProportionComparison {
	const rate1 = wilson(x1, n1, z);
	const rate2 = wilson(x2, n2, z);
	const table: Table2x2 = [
		[x1, n1 - x1],
		[x2, n2 - x2]
	];
	const chi = chiSquare2x2(table);
	const minExpected = chi.expected === null ? null : Math.min(...chi.expected.flat());
	const diff = newcombeDifference(x1, n1, x2, n2, z);
	const common = {
		minExpected,
		rate1,
		rate2,
		difference: diff.difference,
		differenceLow: diff.low,
		differenceHigh: diff.high
	};
	if (minExpected === null || minExpected < MIN_EXPECTED_FOR_CHI_SQUARE || chi.statistic === null) {
		return { test: 'fisher', p: fisherExact2x2(table).p, statistic: null, df: null, ...common };
	}
	return { test: 'chi_square', p: chi.p, statistic: chi.statistic, df: chi.df, ...common };
}
