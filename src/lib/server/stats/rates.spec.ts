import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import fc from 'fast-check';
import jStat from 'jstat';
import { describe as group, expect, it } from 'vitest';
import {
	chiSquare2x2,
	chiSquareTest,
	compareProportions,
	fisherExact2x2,
	mnDifference,
	newcombeDifference,
	P_FLOOR,
	restrictedMle,
	wilson,
	Z95,
	type Table2x2
} from './rates';

group('wilson (Wilson 1927 score interval)', () => {
	// Newcombe, R. G. (1998) Stat Med 17:857–872, Table I, method 3, 95 %, z = 1.959964.
	// 81/263 and 15/148: docs/REFERENCES.md B2 [S][C]. 0/20 and 1/29: not listed in docs/REFERENCES.md;
	// the same Table I values appear in several stored test files citing Newcombe [S], and were
	// recomputed here from the Wilson formula [C] (0/20 → 0, 0.161125; 1/29 → 0.006113, 0.171755).
	const table1: Array<[number, number, number, number]> = [
		[81, 263, 0.2553, 0.3662], // Newcombe 1998 Table I [S]
		[15, 148, 0.0624, 0.1605], // Newcombe 1998 Table I [S]
		[0, 20, 0.0, 0.1611], // Newcombe 1998 Table I [S][C]
		[1, 29, 0.0061, 0.1718] // Newcombe 1998 Table I [S][C]
	];
	for (const [x, n, low, high] of table1) {
		it(`${x}/${n} → (${low}, ${high}) to 4 decimals`, () => {
			const w = wilson(x, n);
			expect(w.rate).toBe(x / n);
			expect(w.low).toBeCloseTo(low, 4);
			expect(w.high).toBeCloseTo(high, 4);
		});
	}
	it('81/263 to full precision with z = Φ⁻¹(0.975) → (0.255288519878274, 0.366209576982800)', () => {
		// docs/REFERENCES.md B2, full-precision Wilson result [C]; z from @stdlib normal quantile
		const z = normalQuantile(0.975, 0, 1);
		const w = wilson(81, 263, z);
		expect(w.low as number).toBeCloseTo(0.255288519878274, 12);
		expect(w.high as number).toBeCloseTo(0.3662095769828, 12);
	});
	it('the default z 1.959964 is Φ⁻¹(0.975) to 6 decimals', () => {
		// Newcombe 1998 uses z = 1.959964 (docs/REFERENCES.md B2); @stdlib normal quantile as the check
		expect(Z95).toBeCloseTo(normalQuantile(0.975, 0, 1), 6);
	});
	it('n = 0 gives nulls; x = 0 and x = n give exact 0 and 1 bounds; bad counts throw', () => {
		// STYLE.md §2.6 (null for undefined); Wilson bounds at the edges are exactly 0 and 1 by the formula
		expect(wilson(0, 0)).toEqual({ rate: null, low: null, high: null });
		expect(wilson(0, 7).low).toBe(0);
		expect(wilson(7, 7).high).toBe(1);
		expect(() => wilson(3, 2)).toThrow(RangeError);
		expect(() => wilson(-1, 2)).toThrow(RangeError);
		expect(() => wilson(1.5, 2)).toThrow(RangeError);
	});
	it('0/10 upper bound is (z²/n)/(1 + z²/n) = 0.2775', () => {
		// Closed form of the Wilson bound at x = 0 [C]; 0.2775 also appears in Newcombe 1998b Table II (e)
		const z2n = (Z95 * Z95) / 10;
		expect(wilson(0, 10).high as number).toBeCloseTo(z2n / (1 + z2n), 14);
	});
});

group('newcombeDifference (Newcombe 1998b method 10)', () => {
	// Newcombe, R. G. (1998) "Interval estimation for the difference between independent proportions:
	// comparison of eleven methods", Stat Med 17:873–890, Table II, method 10. Values as quoted, with
	// that citation, in several stored test files [S]; not listed in docs/REFERENCES.md.
	const table2: Array<[number, number, number, number, number, number]> = [
		[56, 70, 48, 80, 0.0524, 0.3339], // Newcombe 1998b Table II (a) [S]
		[9, 10, 3, 10, 0.1705, 0.809], // Newcombe 1998b Table II (b) [S]
		[6, 7, 2, 7, 0.0582, 0.8062], // Newcombe 1998b Table II (c) [S]
		[5, 56, 0, 29, -0.0381, 0.1926], // Newcombe 1998b Table II (d) [S]
		[0, 10, 0, 20, -0.1611, 0.2775], // Newcombe 1998b Table II (e) [S]
		[0, 10, 0, 10, -0.2775, 0.2775], // Newcombe 1998b Table II (f) [S]
		[10, 10, 0, 20, 0.6791, 1.0], // Newcombe 1998b Table II (g) [S]
		[10, 10, 0, 10, 0.6075, 1.0] // Newcombe 1998b Table II (h) [S]
	];
	for (const [x1, n1, x2, n2, low, high] of table2) {
		it(`${x1}/${n1} − ${x2}/${n2} → (${low}, ${high})`, () => {
			const d = newcombeDifference(x1, n1, x2, n2);
			expect(d.difference as number).toBeCloseTo(x1 / n1 - x2 / n2, 14);
			expect(d.low as number).toBeCloseTo(low, 4);
			expect(d.high as number).toBeCloseTo(high, 4);
		});
	}
	it('an empty group gives nulls', () => {
		// STYLE.md §2.6
		expect(newcombeDifference(1, 10, 0, 0)).toEqual({ difference: null, low: null, high: null });
	});
});

group('fisherExact2x2', () => {
	it("Fisher's tea tasting [[3,1],[1,3]]: two-sided 0.4857, one-sided greater 0.2429", () => {
		// R fisher.test help page (Agresti 1990 p. 61), docs/REFERENCES.md B3 [S]; SciPy 0.485714…, 0.242857… [C]
		const r = fisherExact2x2([
			[3, 1],
			[1, 3]
		]);
		expect(r.p).toBeCloseTo(0.4857142857142857, 12);
		expect(r.pGreater).toBeCloseTo(0.2428571428571428, 12);
		expect(r.oddsRatio).toBe(9); // sample OR = 9 (docs/REFERENCES.md B3)
	});
	it('SciPy example [[6,2],[1,4]]: two-sided p = 4/39', () => {
		// docs/REFERENCES.md B3 [C]: 0.102564… = 4/39
		expect(
			fisherExact2x2([
				[6, 2],
				[1, 4]
			]).p
		).toBeCloseTo(4 / 39, 13);
	});
	it('R Convictions data [[2,15],[10,3]]: two-sided 0.0005367 (not 2× one-sided 0.000930); less 0.0004652', () => {
		// R fisher.test help "Convictions" example, docs/REFERENCES.md B3; SciPy 0.000536724…, 0.000465181… [C]
		const r = fisherExact2x2([
			[2, 15],
			[10, 3]
		]);
		expect(r.p).toBeCloseTo(0.0005367241191434358, 15);
		expect(r.pLess).toBeCloseTo(0.000465180943362905, 15);
		expect(r.p).not.toBeCloseTo(2 * r.pLess, 5);
	});
	it('degenerate tables: empty table and zero margins give p = 1; bc = 0 gives a null odds ratio', () => {
		// Conditional on the margins there is only one possible table (definition)
		expect(
			fisherExact2x2([
				[0, 0],
				[0, 0]
			]).p
		).toBe(1);
		const r = fisherExact2x2([
			[5, 0],
			[0, 5]
		]);
		expect(r.oddsRatio).toBeNull();
		expect(r.p).toBeCloseTo(2 / 252, 14); // 2 of C(10,5) = 252 tables, [C]
	});
	it('agrees with the same rule evaluated with jStat.hypgeom.pdf on 200 random tables', () => {
		// Cross-check against a second library (jstat 1.9.6); production code uses @stdlib
		const jstatFisher = ([[a, b], [c, d]]: Table2x2): number => {
			const N = a + b + c + d;
			const row1 = a + b;
			const col1 = a + c;
			const pdf = (k: number) => jStat.hypgeom.pdf(k, N, col1, row1);
			const cutoff = pdf(a) * (1 + 1e-7);
			let p = 0;
			for (let k = Math.max(0, row1 + col1 - N); k <= Math.min(row1, col1); k++) {
				const pk = pdf(k);
				if (pk <= cutoff) p += pk;
			}
			return Math.min(1, p);
		};
		const cell = fc.integer({ min: 0, max: 40 });
		fc.assert(
			fc.property(cell, cell, cell, cell, (a, b, c, d) => {
				const t: Table2x2 = [
					[a, b],
					[c, d]
				];
				const mine = fisherExact2x2(t);
				const other = jstatFisher(t);
				expect(Math.abs(mine.p - other)).toBeLessThanOrEqual(1e-9 * Math.max(other, 1e-300) + 1e-15);
				// The one-sided tails overlap in the observed table: pLess + pGreater = 1 + P(A = a)
				const pa = jStat.hypgeom.pdf(a, a + b + c + d, a + c, a + b);
				expect(mine.pLess + mine.pGreater).toBeCloseTo(Math.min(2, 1 + pa), 9);
				expect(mine.p).toBeLessThanOrEqual(1);
				expect(mine.p).toBeGreaterThan(0);
			}),
			{ numRuns: 200, seed: 20250101 }
		);
	});
});

group('chi-square (Pearson, no continuity correction)', () => {
	it('tea table [[3,1],[1,3]]: X² = 2.0, df 1, p = 0.1573 (uncorrected)', () => {
		// docs/REFERENCES.md B3 [C]: uncorrected X² = 2.0 (p = 0.1573); Yates would give 0.5
		const r = chiSquare2x2([
			[3, 1],
			[1, 3]
		]);
		expect(r.statistic).toBeCloseTo(2, 14);
		expect(r.df).toBe(1);
		expect(r.p as number).toBeCloseTo(0.15729920705028105, 10); // SciPy chi2_contingency(correction=False) [C]
		expect(r.expected).toEqual([
			[2, 2],
			[2, 2]
		]);
	});
	it('SciPy doc example [[10,10,20],[20,20,20]]: X² = 2.7778, df 2, p = 0.24935', () => {
		// docs/REFERENCES.md B3 [C]
		const r = chiSquareTest([
			[10, 10, 20],
			[20, 20, 20]
		]);
		expect(r.statistic as number).toBeCloseTo(2.7777777777777777, 12);
		expect(r.df).toBe(2);
		expect(r.p as number).toBeCloseTo(0.24935220877729622, 10);
	});
	it('a zero margin leaves the statistic undefined (null)', () => {
		// E = 0 in a denominator (definition); STYLE.md §2.6
		const r = chiSquare2x2([
			[0, 4],
			[0, 6]
		]);
		expect(r.statistic).toBeNull();
		expect(r.p).toBeNull();
	});
});

group('mnDifference (Miettinen & Nurminen 1985 score test and its inverted interval)', () => {
	// docs/REFERENCES.md B10. Newcombe, R. G. (1998b) Stat Med 17:873–890, Table II, method 6 (Miettinen–Nurminen), 95 %.
	// The paper itself was not read: (a), (b) and (g) as quoted [S] in GSK-Biostatistics/cicalc
	// tests/testthat/test-prop_ci_mn.R ("matches the values in the paper"); (d) as quoted [S] in
	// PeteLaud/ratesci tests/testthat/test3.R ("Newcombe RD example (d), Miettinen-Nurminen").
	const published: Array<[string, number, number, number, number, number, number]> = [
		['(a)', 56, 70, 48, 80, 0.0528, 0.3382],
		['(b)', 9, 10, 3, 10, 0.17, 0.8406],
		['(d)', 5, 56, 0, 29, -0.0326, 0.1933],
		['(g)', 10, 10, 0, 20, 0.7156, 1.0]
	];
	for (const [ex, x1, n1, x2, n2, low, high] of published) {
		it(`Newcombe 1998b Table II ${ex} method 6: ${x1}/${n1} − ${x2}/${n2} → (${low}, ${high})`, () => {
			const r = mnDifference(x1, n1, x2, n2);
			expect(r.difference as number).toBeCloseTo(x1 / n1 - x2 / n2, 14);
			expect(r.low as number).toBeCloseTo(low, 4);
			expect(r.high as number).toBeCloseTo(high, 4);
		});
	}
	it('the other Table II examples, recomputed here: (c) 0.0342–0.8534, (e) −0.1658–0.2844, (f) ±0.2879, (h) 0.6636–1', () => {
		// [C] this implementation only: the published method-6 column for (c), (e), (f), (h) was not found in a stored copy
		const cases: Array<[number, number, number, number, number, number]> = [
			[6, 7, 2, 7, 0.0342, 0.8534],
			[0, 10, 0, 20, -0.1658, 0.2844],
			[0, 10, 0, 10, -0.2879, 0.2879],
			[10, 10, 0, 10, 0.6636, 1]
		];
		for (const [x1, n1, x2, n2, low, high] of cases) {
			const r = mnDifference(x1, n1, x2, n2);
			expect(r.low as number).toBeCloseTo(low, 4);
			expect(r.high as number).toBeCloseTo(high, 4);
		}
	});
	it('at δ = 0 the statistic is Pearson X² · (N − 1)/N: 56/70 vs 48/80 → z = 2.6413, p = 0.00826', () => {
		// Miettinen & Nurminen 1985 (the N/(N − 1) factor) [M]; the Pearson z 2.65 at δ = 0 for this
		// table is [S] in GSK-Biostatistics/cicalc tests/testthat/_snaps/prop_ci_diff.md (Mee, "At 0
		// the statistic is 2.65"); X² from chiSquare2x2 (docs/REFERENCES.md B3) [C]
		const r = mnDifference(56, 70, 48, 80);
		const x2 = chiSquare2x2([
			[56, 14],
			[48, 32]
		]).statistic as number;
		expect(Math.sqrt(x2)).toBeCloseTo(2.65, 2);
		expect((r.statistic as number) ** 2).toBeCloseTo((x2 * 149) / 150, 10);
		expect(r.statistic as number).toBeCloseTo(2.6413232722941262, 10);
		expect(r.p as number).toBeCloseTo(0.00825828792938074, 12); // erfc(z/√2) [C]
		expect(r.verdict).toBe('higher');
		expect(r.pBelow).toBe(false);
	});
	it('restrictedMle maximises the likelihood on the line p1 − p2 = δ (checked against a fine grid)', () => {
		// [C] the closed-form root of Farrington & Manning (1990) against brute force
		const ll = (x1: number, n1: number, x2: number, n2: number, p1: number, p2: number) => {
			const t = (x: number, n: number, p: number) => (x > 0 ? x * Math.log(p) : 0) + (n - x > 0 ? (n - x) * Math.log(1 - p) : 0);
			return t(x1, n1, p1) + t(x2, n2, p2);
		};
		const tables: Array<[number, number, number, number, number]> = [
			[56, 70, 48, 80, 0.1],
			[9, 10, 3, 10, -0.2],
			[5, 56, 0, 29, 0.15],
			[0, 10, 0, 20, 0.05],
			[7, 25, 2, 25, 0.3]
		];
		for (const [x1, n1, x2, n2, delta] of tables) {
			const [p1, p2] = restrictedMle(x1, n1, x2, n2, delta);
			expect(p1 - p2).toBeCloseTo(delta, 12);
			let best = -Infinity;
			const lo = Math.max(0, delta);
			const hi = Math.min(1, 1 + delta);
			for (let i = 1; i < 20000; i++) {
				const q1 = lo + ((hi - lo) * i) / 20000;
				best = Math.max(best, ll(x1, n1, x2, n2, q1, q1 - delta));
			}
			expect(ll(x1, n1, x2, n2, p1, p2)).toBeGreaterThanOrEqual(best - 1e-9);
		}
	});
	it('test and interval agree on every table with n ≤ 10 and on 200 random ones up to n = 5,000: the interval excludes 0 exactly when p < 0.05', () => {
		// By construction (mnDifference's doc); checked exhaustively on small tables and at random on large ones
		for (let n1 = 1; n1 <= 10; n1++) {
			for (let n2 = 1; n2 <= 10; n2++) {
				for (let x1 = 0; x1 <= n1; x1++) {
					for (let x2 = 0; x2 <= n2; x2++) {
						const r = mnDifference(x1, n1, x2, n2);
						const excludes = (r.low as number) > 0 || (r.high as number) < 0;
						expect(excludes).toBe((r.p as number) < 0.05);
						expect(r.low as number).toBeLessThanOrEqual(r.difference as number);
						expect(r.high as number).toBeGreaterThanOrEqual(r.difference as number);
					}
				}
			}
		}
		const count = fc.integer({ min: 1, max: 5000 });
		fc.assert(
			fc.property(count, count, fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (n1, n2, f1, f2) => {
				const r = mnDifference(Math.round(f1 * n1), n1, Math.round(f2 * n2), n2);
				const excludes = (r.low as number) > 0 || (r.high as number) < 0;
				expect(excludes).toBe((r.p as number) < 0.05);
				expect(r.verdict).toBe((r.low as number) > 0 ? 'higher' : (r.high as number) < 0 ? 'lower' : 'unclear');
				expect(r.p as number).toBeGreaterThan(0);
			}),
			{ numRuns: 200, seed: 20261203 }
		);
	}, 30_000);
	it('a p-value is never 0: 3000/3000 vs 0/3000 gives the bound 1e-15 with pBelow', () => {
		// erfc underflows to 0 beyond z ≈ 38; P_FLOOR is the stated bound
		const r = mnDifference(3000, 3000, 0, 3000);
		expect(r.p).toBe(P_FLOOR);
		expect(r.pBelow).toBe(true);
		expect(r.verdict).toBe('higher');
		expect(r.high).toBe(1);
	});
	it('equal shares: z = 0, p = 1; an empty group gives nulls; bad counts throw', () => {
		// Definition; STYLE.md §2.6 (null for undefined)
		expect(mnDifference(5, 10, 5, 10)).toMatchObject({ difference: 0, statistic: 0, p: 1, verdict: 'unclear' });
		expect(mnDifference(1, 10, 0, 0)).toEqual({ difference: null, low: null, high: null, statistic: null, p: null, pBelow: false, verdict: null });
		expect(() => mnDifference(11, 10, 0, 5)).toThrow(RangeError);
		expect(() => mnDifference(1, 10, 0, 5, 1)).toThrow(RangeError);
	});
	it('the issue\'s contradiction cannot happen: an interval of −9.9 to −0.3 points comes with p < 0.05', () => {
		// 50/400 vs 70/400 (a −5.0 point difference): the MN interval excludes 0 and p < 0.05 together [C]
		const r = mnDifference(50, 400, 70, 400);
		expect(r.high as number).toBeLessThan(0);
		expect(r.p as number).toBeLessThan(0.05);
		expect(r.verdict).toBe('lower');
	});
});

group('compareProportions', () => {
	it('carries the Wilson intervals and the Miettinen–Nurminen difference', () => {
		// Newcombe 1998a Table I (Wilson) and 1998b Table II (a) method 6: 0.0528, 0.3382 [S]
		const r = compareProportions(56, 70, 48, 80);
		expect(r.rate1).toEqual(wilson(56, 70));
		expect(r.rate2).toEqual(wilson(48, 80));
		expect(r.low as number).toBeCloseTo(0.0528, 4);
		expect(r.high as number).toBeCloseTo(0.3382, 4);
		expect(r.verdict).toBe('higher');
	});
	it('an empty group: difference, p and verdict null', () => {
		// Definition: with n2 = 0 the difference is undefined
		const r = compareProportions(3, 10, 0, 0);
		expect(r.difference).toBeNull();
		expect(r.p).toBeNull();
		expect(r.verdict).toBeNull();
		expect(r.rate2.rate).toBeNull();
	});
});
