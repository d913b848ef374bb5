import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import fc from 'fast-check';
import jStat from 'jstat';
import { describe as group, expect, it } from 'vitest';
import {
	chiSquare2x2,
	chiSquareTest,
	compareProportions,
	fisherExact2x2,
	newcombeDifference,
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

group('compareProportions', () => {
	it('40/200 vs 20/200: all expected ≥ 5 → chi-square X² = 7.8431, p = 0.005101', () => {
		// SciPy chi2_contingency([[40,160],[20,180]], correction=False) [C]
		const r = compareProportions(40, 200, 20, 200);
		expect(r.test).toBe('chi_square');
		expect(r.statistic as number).toBeCloseTo(7.843137254901961, 10);
		expect(r.p as number).toBeCloseTo(0.005101399646004978, 10);
		expect(r.df).toBe(1);
		expect(r.minExpected).toBe(30);
		expect(r.difference).toBeCloseTo(0.1, 14);
	});
	it('5/50 vs 1/50: an expected count of 3 → Fisher p = 0.2044', () => {
		// SciPy fisher_exact([[5,45],[1,49]]) = 0.20440158503099357 [C]
		const r = compareProportions(5, 50, 1, 50);
		expect(r.test).toBe('fisher');
		expect(r.p as number).toBeCloseTo(0.20440158503099357, 12);
		expect(r.statistic).toBeNull();
		expect(r.minExpected).toBe(3);
	});
	it('carries the Wilson intervals and the Newcombe difference interval', () => {
		// Newcombe 1998b Table II (a): 56/70 − 48/80 → 0.0524, 0.3339 [S]; Wilson per Newcombe 1998a
		const r = compareProportions(56, 70, 48, 80);
		expect(r.rate1).toEqual(wilson(56, 70));
		expect(r.rate2).toEqual(wilson(48, 80));
		expect(r.differenceLow as number).toBeCloseTo(0.0524, 4);
		expect(r.differenceHigh as number).toBeCloseTo(0.3339, 4);
	});
	it('an empty group: Fisher with p = 1, difference null', () => {
		// Definition: with n2 = 0 only one table is possible; the difference is undefined
		const r = compareProportions(3, 10, 0, 0);
		expect(r.test).toBe('fisher');
		expect(r.p).toBe(1);
		expect(r.difference).toBeNull();
		expect(r.rate2.rate).toBeNull();
	});
});
