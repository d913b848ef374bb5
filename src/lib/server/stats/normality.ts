// The Anderson–Darling test of normality with the mean and SD estimated from the data
// (Stephens' "case 3"), and the normal tail shares capability needs.
//
// A² = −n − (1/n) Σ (2i − 1) [ln Φ(z_(i)) + ln(1 − Φ(z_(n+1−i)))], z = (x − x̄)/s (s with n − 1);
// A²* = A² (1 + 0.75/n + 2.25/n²) and its p-value from the four-piece approximation of
// D'Agostino & Stephens (1986), Table 4.9, as R's nortest::ad.test codes it (docs/REFERENCES.md B11).
// Φ comes from @stdlib (erfc-based, accurate to the last digits in the far tails), and
// 1 − Φ(z) is taken as Φ(−z) so that neither tail loses its digits.
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import { finiteArray, type Values } from './input';
import { momentsOf, momentsToSummary } from './summary';

/** Fewest readings the test and its n-adjustment are defined for (D'Agostino & Stephens 1986; nortest). */
export const AD_MIN_N = 8;

/** Below this p-value the data are taken as not normal. */
export const NORMALITY_ALPHA = 0.05;

/**
 * The largest A²* the p-value approximation is used at: its last piece,
 * exp(1.2937 − 5.709 A + 0.0186 A²), turns upwards beyond A = 5.709/(2 · 0.0186) ≈ 153.5.
 * Beyond it the p-value at this point is given as an upper bound (`pBelow`).
 */
const AD_P_MAX_A = 153;

/** Φ(z), the standard normal cdf. */
export const phi = (z: number): number => normalCdf(z, 0, 1);

/** Φ⁻¹(p), the standard normal quantile. */
export const phiInverse = (p: number): number => normalQuantile(p, 0, 1);

/** ln Φ(z), floored at the log of the smallest double so that an extreme reading stays finite. */
function logPhi(z: number): number {
	return Math.log(Math.max(phi(z), Number.MIN_VALUE));
}

/**
 * A² of sorted values against a normal with the given mean and SD (no n-adjustment). With known
 * parameters this is the statistic of the simple hypothesis; `andersonDarling` passes the
 * sample's own mean and SD.
 */
export function andersonDarlingStatistic(sorted: readonly number[], mean: number, sd: number): number {
	const n = sorted.length;
	let sum = 0;
	for (let i = 0; i < n; i++) {
		const lo = (sorted[i] - mean) / sd;
		const hi = (sorted[n - 1 - i] - mean) / sd;
		sum += (2 * i + 1) * (logPhi(lo) + logPhi(-hi));
	}
	return -n - sum / n;
}

/** p-value of an n-adjusted A²* (D'Agostino & Stephens 1986, Table 4.9); `below`: the value is an upper bound. */
export function andersonDarlingP(aStar: number): { p: number; below: boolean } {
	const a = Math.min(aStar, AD_P_MAX_A);
	let p: number;
	if (a < 0.2) p = 1 - Math.exp(-13.436 + 101.14 * a - 223.73 * a * a);
	else if (a < 0.34) p = 1 - Math.exp(-8.318 + 42.796 * a - 59.938 * a * a);
	else if (a < 0.6) p = Math.exp(0.9177 - 4.279 * a - 1.38 * a * a);
	else p = Math.exp(1.2937 - 5.709 * a + 0.0186 * a * a);
	return { p: Math.min(1, Math.max(p, Number.MIN_VALUE)), below: aStar > AD_P_MAX_A };
}

export interface NormalityTest {
	method: 'anderson_darling';
	n: number;
	/** A² with the sample mean and SD; null when n < 8 or the readings do not vary. */
	a2: number | null;
	/** A²* = A²(1 + 0.75/n + 2.25/n²). */
	a2Adjusted: number | null;
	pValue: number | null;
	/** True when pValue is an upper bound (A²* beyond the approximation's range). */
	pBelow: boolean;
	/** pValue < 0.05; null when the test could not be run. */
	rejected: boolean | null;
}

/** The Anderson–Darling test of normality, mean and SD estimated from the values. */
export function andersonDarling(values: Values): NormalityTest {
	const x = finiteArray(values);
	const n = x.length;
	const s = momentsToSummary(momentsOf(x));
	const none: NormalityTest = { method: 'anderson_darling', n, a2: null, a2Adjusted: null, pValue: null, pBelow: false, rejected: null };
	if (n < AD_MIN_N || s.mean === null || s.sd === null || !(s.sd > 0)) return none;
	const sorted = Float64Array.from(x).sort();
	const a2 = andersonDarlingStatistic(Array.from(sorted), s.mean, s.sd);
	const a2Adjusted = a2 * (1 + 0.75 / n + 2.25 / (n * n));
	const { p, below } = andersonDarlingP(a2Adjusted);
	return { method: 'anderson_darling', n, a2, a2Adjusted, pValue: p, pBelow: below, rejected: p < NORMALITY_ALPHA };
}
