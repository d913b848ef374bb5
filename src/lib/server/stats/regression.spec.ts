import fc from 'fast-check';
import jStat from 'jstat';
import { linearRegression } from 'simple-statistics';
import { describe as group, expect, it } from 'vitest';
import { readStrdColumns } from '../../../../tests/fixtures/strd/read-strd';
import { linearFit } from './regression';

function relErr(actual: number | null, expected: number): number {
	if (actual === null) return Number.POSITIVE_INFINITY;
	return Math.abs(actual - expected) / Math.abs(expected);
}

group('linearFit against NIST StRD Norris', () => {
	// NIST StRD linear regression dataset Norris (36 observations, lower difficulty).
	// Certified values: B0, B1, residual SD and R² were first written down from memory of the NIST Norris
	// page [M]; all of them, plus the standard errors, were then also read [S] in two stored copies:
	// GNU GSL fit/test.c (GitHub BrianGladman/gsl: B0, B1, SEs, residual SS) and the test-library
	// model LS01 of an optimisation-modelling system (Kalvelagen & Dirkse 2008; all values). Data: tests/fixtures/strd/Norris.csv (header names the sources).
	// Tolerance: GSL fit/test.c uses relative 1e-10 for Norris.
	const { x, y } = readStrdColumns('Norris');
	const fit = linearFit(x, y);

	it('has the 36 observations of the NIST file', () => {
		// NIST StRD Norris: 36 observations
		expect(x.length).toBe(36);
		expect(fit.n).toBe(36);
		expect(fit.df).toBe(34); // certified residual degrees of freedom 34 (LS01 copy [S])
	});
	it('intercept −0.262323073774029, slope 1.00211681802045', () => {
		// NIST StRD Norris, certified values [M][S]; GSL tolerance 1e-10
		expect(relErr(fit.intercept, -0.262323073774029)).toBeLessThanOrEqual(1e-10);
		expect(relErr(fit.slope, 1.00211681802045)).toBeLessThanOrEqual(1e-10);
	});
	it('residual SD 0.884796396144373, R² 0.999993745883712', () => {
		// NIST StRD Norris, certified values [M][S]
		expect(relErr(fit.residualSd, 0.884796396144373)).toBeLessThanOrEqual(1e-10);
		expect(relErr(fit.r2, 0.999993745883712)).toBeLessThanOrEqual(1e-12);
	});
	it('standard errors: intercept 0.232818234301152, slope 0.429796848199937E-03', () => {
		// NIST StRD Norris, certified "standard deviation of estimate" [S] (GSL fit/test.c, LS01)
		expect(relErr(fit.interceptSe, 0.232818234301152)).toBeLessThanOrEqual(1e-10);
		expect(relErr(fit.slopeSe, 0.429796848199937e-3)).toBeLessThanOrEqual(1e-10);
	});
	it('band at x̄ is ŷ ± t(0.975, 34)·s/√36', () => {
		// Textbook CI of the mean response at x̄ (√(1/n) term only); t(0.975, 34) = 2.032244509317718
		// from @stdlib, cross-checked against jStat.studentt.inv, which is only good to ~3e-8 here [C]
		const xbar = x.reduce((s, v) => s + v, 0) / x.length;
		const b = fit.band(xbar);
		const half = (2.032244509317718 * 0.884796396144373) / 6;
		expect(b).not.toBeNull();
		expect(((b?.high as number) - (b?.low as number)) / 2).toBeCloseTo(half, 9);
		expect(Math.abs(jStat.studentt.inv(0.975, 34) - 2.032244509317718)).toBeLessThan(1e-6);
	});
});

group('linearFit on a small exactly computable example', () => {
	// x = 1…5, y = 2, 4, 5, 4, 5: x̄ = 3, ȳ = 4, Sxx = 10, Sxy = 6, Syy = 6 → slope 0.6, intercept 2.2,
	// RSS = Syy − Sxy²/Sxx = 2.4, s = √0.8, R² = 0.6 (hand computation [C]).
	// t(0.975, 3) = 3.182446305284263 [M] (the familiar table value 3.182).
	const fit = linearFit([1, 2, 3, 4, 5], [2, 4, 5, 4, 5]);

	it('coefficients, residual SD, R² and standard errors', () => {
		expect(fit.slope as number).toBeCloseTo(0.6, 14);
		expect(fit.intercept as number).toBeCloseTo(2.2, 14);
		expect(fit.residualSd as number).toBeCloseTo(Math.sqrt(0.8), 14);
		expect(fit.r2 as number).toBeCloseTo(0.6, 14);
		expect(fit.slopeSe as number).toBeCloseTo(Math.sqrt(0.8 / 10), 14);
		expect(fit.interceptSe as number).toBeCloseTo(Math.sqrt(0.8 * (1 / 5 + 9 / 10)), 14);
	});
	it('95 % band of the mean at x = 3 and x = 5', () => {
		// ŷ ± t·s·√(1/n + (x − x̄)²/Sxx) [C]
		const t = 3.182446305284263;
		const s = Math.sqrt(0.8);
		const at3 = fit.band(3);
		expect(at3?.fit).toBeCloseTo(4, 14);
		expect(at3?.high as number).toBeCloseTo(4 + t * s * Math.sqrt(1 / 5), 9);
		const at5 = fit.band(5);
		expect(at5?.fit).toBeCloseTo(5.2, 14);
		expect(at5?.low as number).toBeCloseTo(5.2 - t * s * Math.sqrt(1 / 5 + 4 / 10), 9);
	});
	it('the band widens away from x̄ and a 99 % band is wider than a 95 % one', () => {
		// Properties of the formula [C]
		const w = (x0: number, f = fit) => {
			const b = f.band(x0);
			return (b?.high as number) - (b?.low as number);
		};
		expect(w(3)).toBeLessThan(w(4));
		expect(w(4)).toBeLessThan(w(10));
		expect(w(3, linearFit([1, 2, 3, 4, 5], [2, 4, 5, 4, 5], 0.99))).toBeGreaterThan(w(3));
	});
});

group('linearFit edge cases and agreement with simple-statistics', () => {
	it('perfect line: R² 1, residual SD 0, zero-width band', () => {
		// y = 2x + 1 exactly [C]
		const f = linearFit([0, 1, 2, 3], [1, 3, 5, 7]);
		expect(f.slope).toBe(2);
		expect(f.intercept).toBe(1);
		expect(f.r2).toBe(1);
		expect(f.residualSd).toBe(0);
		expect(f.band(10)).toEqual({ x: 10, fit: 21, low: 21, high: 21 });
	});
	it('undefined cases give nulls, never NaN', () => {
		// STYLE.md §2.6
		expect(linearFit([], []).slope).toBeNull();
		expect(linearFit([1], [1]).slope).toBeNull();
		expect(linearFit([2, 2, 2], [1, 2, 3]).slope).toBeNull(); // all x equal
		const two = linearFit([1, 2], [1, 3]);
		expect(two.slope).toBe(2);
		expect(two.residualSd).toBeNull(); // n − 2 = 0
		expect(two.band(1)).toBeNull();
		expect(linearFit([1, 2, 3], [4, 4, 4]).r2).toBeNull(); // Syy = 0
		expect(() => linearFit([1, 2], [1])).toThrow(RangeError);
	});
	it('accepts Float64Arrays', () => {
		// Same small example as above [C]
		const f = linearFit(Float64Array.from([1, 2, 3, 4, 5]), Float64Array.from([2, 4, 5, 4, 5]));
		expect(f.slope as number).toBeCloseTo(0.6, 14);
	});
	it('shifting x by c keeps the slope and moves the intercept by −slope·c', () => {
		// Invariance of least squares under translation (property test)
		fc.assert(
			fc.property(
				fc.array(fc.tuple(fc.integer({ min: -1000, max: 1000 }), fc.integer({ min: -1000, max: 1000 })), {
					minLength: 3,
					maxLength: 40
				}),
				fc.integer({ min: -1e5, max: 1e5 }),
				(pairs, c) => {
					const xs = pairs.map((p) => p[0]);
					const ys = pairs.map((p) => p[1]);
					const a = linearFit(xs, ys);
					if (a.slope === null) return;
					const b = linearFit(
						xs.map((v) => v + c),
						ys
					);
					const scale = 1 + Math.abs(a.slope);
					expect(Math.abs((b.slope as number) - a.slope)).toBeLessThanOrEqual(1e-9 * scale);
					expect(
						Math.abs((b.intercept as number) - ((a.intercept as number) - a.slope * c))
					).toBeLessThanOrEqual(1e-7 * (1 + Math.abs(a.intercept as number) + Math.abs(a.slope * c)));
				}
			)
		);
	});
	it('coefficients equal simple-statistics linearRegression on Norris', () => {
		// Cross-check against the package the module delegates to (sanity of the wiring)
		const { x, y } = readStrdColumns('Norris');
		const ss = linearRegression(x.map((v, i) => [v, y[i]]));
		const f = linearFit(x, y);
		expect(f.slope).toBe(ss.m);
		expect(f.intercept).toBe(ss.b);
	});
});
