import jStat from 'jstat';
import { describe as group, expect, it } from 'vitest';
import { andersonDarling, andersonDarlingP, andersonDarlingStatistic, phi, phiInverse } from './normality';

// NIST e-Handbook §7.2.6.2's 12 measurements (docs/REFERENCES.md B8), reused as a small sample.
const NIST12 = [95.1772, 95.1567, 95.1937, 95.1959, 95.1442, 95.061, 95.1591, 95.1195, 95.1772, 95.0925, 95.199, 95.1682];

/**
 * A² by a second, independent route: the definition n∫₀¹ (Fₙ(u) − u)² / (u(1 − u)) du over
 * u = Φ(z), integrated exactly piece by piece (Fₙ = c is constant between the uᵢ, and
 * (c − u)²/(u(1 − u)) = −1 + c²/u + (1 − c)²/(1 − u)), with Φ(z) = erfc(−z/√2)/2 from jstat's erfc.
 */
function a2ByIntegral(values: number[], mean: number, sd: number): number {
	const n = values.length;
	const u = [...values].sort((a, b) => a - b).map((x) => 0.5 * jStat.erfc(-(x - mean) / sd / Math.SQRT2));
	const edges = [0, ...u, 1];
	let total = 0;
	for (let i = 0; i < edges.length - 1; i++) {
		const [a, b] = [edges[i], edges[i + 1]];
		if (b <= a) continue;
		const c = i / n;
		const lnA = c === 0 ? 0 : c * c * Math.log(b / a);
		const lnB = c === 1 ? 0 : (1 - c) ** 2 * Math.log((1 - a) / (1 - b));
		total += -(b - a) + lnA + lnB;
	}
	return n * total;
}

group('Anderson–Darling statistic', () => {
	it('Boost.Math anderson_darling_normality_statistic(1..5, μ 0, σ 1) = 19.49684', () => {
		// [S] boostmath R package reference page (andrjohns.github.io/boostmath/reference/anderson_darling_test.html),
		// the R binding of Boost.Math's anderson_darling_normality_statistic: a second library, known parameters
		expect(andersonDarlingStatistic([1, 2, 3, 4, 5], 0, 1)).toBeCloseTo(19.49684, 5);
	});
	it('equals the definition integrated exactly (second route, jstat erfc) on NIST §7.2.6.2 data with estimated mean and SD', () => {
		// [C] the computing formula against the integral definition (Anderson & Darling 1954; Stephens 1974)
		const mean = NIST12.reduce((s, x) => s + x, 0) / 12;
		const sd = Math.sqrt(NIST12.reduce((s, x) => s + (x - mean) ** 2, 0) / 11);
		const t = andersonDarling(NIST12);
		expect(t.a2 as number).toBeCloseTo(a2ByIntegral(NIST12, mean, sd), 10);
		expect(t.a2 as number).toBeCloseTo(0.515423, 6);
		// A²* = A²(1 + 0.75/n + 2.25/n²) (D'Agostino & Stephens 1986; nortest::ad.test [S])
		expect(t.a2Adjusted as number).toBeCloseTo(0.515423 * (1 + 0.75 / 12 + 2.25 / 144), 5);
		expect(t.pValue as number).toBeCloseTo(0.1516, 4);
		expect(t.rejected).toBe(false);
	});
	it('a skewed sample (x = 1.2^i) is rejected; far tails stay finite', () => {
		// [C] second route as above; the exponential series is far from normal
		const xs = Array.from({ length: 40 }, (_, i) => 1.2 ** i);
		const t = andersonDarling(xs);
		const m = xs.reduce((s, x) => s + x, 0) / 40;
		const sd = Math.sqrt(xs.reduce((s, x) => s + (x - m) ** 2, 0) / 39);
		expect(t.a2 as number).toBeCloseTo(a2ByIntegral(xs, m, sd), 8);
		expect(t.rejected).toBe(true);
		expect(t.pValue as number).toBeLessThan(0.001);
		const extreme = andersonDarling([...Array(99).fill(0).map((_, i) => i % 2), 1e6]);
		expect(Number.isFinite(extreme.a2)).toBe(true);
		expect(extreme.pValue as number).toBeGreaterThan(0);
	});
	it('fewer than 8 readings or no spread: not tested', () => {
		// nortest::ad.test: "sample size must be greater than 7" [S]
		expect(andersonDarling([1, 2, 3, 4, 5, 6, 7])).toMatchObject({ a2: null, pValue: null, rejected: null });
		expect(andersonDarling(Array(20).fill(3)).rejected).toBeNull();
	});
});

group('Anderson–Darling p-value (D’Agostino & Stephens 1986, Table 4.9)', () => {
	it("reproduces Stephens' case-3 critical values of A*: 0.631 → 10 %, 0.752 → 5 %, 0.873 → 2.5 %, 1.035 → 1 %", () => {
		// Critical values: Stephens (1974) JASA 69:730, case 3 [M] (also in the stored MATLAB adtest header's source list);
		// the four-piece formula as coded in R nortest::ad.test [S] (patperry/…/ad.test.R)
		expect(andersonDarlingP(0.631).p).toBeCloseTo(0.1, 3);
		expect(andersonDarlingP(0.752).p).toBeCloseTo(0.05, 3);
		expect(andersonDarlingP(0.873).p).toBeCloseTo(0.025, 3);
		expect(andersonDarlingP(1.035).p).toBeCloseTo(0.01, 3);
	});
	it('each piece as nortest codes it, and a bound (never 0) beyond the last piece’s range', () => {
		// nortest::ad.test [S]
		expect(andersonDarlingP(0.1).p).toBeCloseTo(1 - Math.exp(-13.436 + 10.114 - 2.2373), 12);
		expect(andersonDarlingP(0.3).p).toBeCloseTo(1 - Math.exp(-8.318 + 12.8388 - 5.39442), 12);
		expect(andersonDarlingP(0.5).p).toBeCloseTo(Math.exp(0.9177 - 2.1395 - 0.345), 12);
		expect(andersonDarlingP(2).p).toBeCloseTo(Math.exp(1.2937 - 11.418 + 0.0744), 12);
		const far = andersonDarlingP(500);
		expect(far.below).toBe(true);
		expect(far.p).toBeGreaterThan(0);
		expect(far.p).toBeLessThan(1e-150);
	});
});

group('Φ and Φ⁻¹ (@stdlib) against jstat', () => {
	it('agree with jstat to 1e-9 relative down to z = −5, and with mpmath at z = −8 where jstat drifts', () => {
		// jstat 1.9.6 erfc as the second library [C]; Φ(−8) = 6.22096057427178412e-16 [C] (mpmath ncdf, 30 digits)
		for (const z of [-5, -3, -1.96, 0, 1, 2.5]) expect(phi(z) / (0.5 * jStat.erfc(-z / Math.SQRT2))).toBeCloseTo(1, 9);
		expect(phi(-8) / 6.22096057427178412e-16).toBeCloseTo(1, 12);
		expect(phiInverse(0.00135)).toBeCloseTo(-3.0, 2);
		expect(phiInverse(0.975)).toBeCloseTo(1.959964, 6);
	});
});
