import { describe as group, expect, it } from 'vitest';
import { averageMovingRange } from './capability';
import { baselineFigures, clippedLimits, controlChart, ewmaChart, pChart, pChartLimits, sigmaFromMrBar } from './control';

group('controlChart (individuals / moving range)', () => {
	// Hand computation [C]: readings 10, 11, 10, 11, 10, 11, 10, 11, 10, 20 at t = 1…10.
	// MR = 1 (×8) and 10 → MR̄ = 18/9 = 2; x̄ = 114/10 = 11.4; UCL = 11.4 + 2.66·2 = 16.72,
	// LCL = 6.08; MR UCL = 3.267·2 = 6.534 (constants from docs/REFERENCES.md B5).
	const values = [10, 11, 10, 11, 10, 11, 10, 11, 10, 20];
	const points = values.map((value, i) => ({ t: i + 1, value }));

	it('limits and the points beyond them', () => {
		const c = controlChart(points);
		expect(c.n).toBe(10);
		expect(c.centre as number).toBeCloseTo(11.4, 12);
		expect(c.mrBar as number).toBeCloseTo(2, 12);
		expect(c.ucl as number).toBeCloseTo(16.72, 12);
		expect(c.lcl as number).toBeCloseTo(6.08, 12);
		expect(c.mrUcl as number).toBeCloseTo(6.534, 12);
		expect(c.mrLcl).toBe(0);
		expect(c.beyondLimits).toEqual([9]);
		expect(c.mrBeyondLimits).toEqual([9]);
		expect(c.points[0].mr).toBeNull();
		expect(c.points[9].mr).toBe(10);
	});
	it('sorts by time (Dates too) and keeps the input position', () => {
		// Definition in capability.ts: stable sort on t; indices refer to the returned points
		const shuffled = [...points].reverse().map((p) => ({ t: new Date(Date.UTC(2024, 0, p.t)), value: p.value }));
		const c = controlChart(shuffled);
		expect(c.points.map((p) => p.value)).toEqual(values);
		expect(c.points[9].sourceIndex).toBe(0);
		expect(c.beyondLimits).toEqual([9]);
	});
	it('fewer than two points: no limits', () => {
		// A moving range needs two readings (STYLE.md §2.6: null for undefined)
		const c = controlChart([{ t: 1, value: 5 }]);
		expect(c.centre).toBe(5);
		expect(c.ucl).toBeNull();
		expect(c.mrLcl).toBeNull();
		expect(c.beyondLimits).toEqual([]);
		expect(controlChart([]).centre).toBeNull();
	});
	it('averageMovingRange: mean |x_i − x_{i−1}|', () => {
		// Definition (docs/REFERENCES.md B4: σ̂ = MR̄/1.128 for individuals)
		expect(averageMovingRange([1, 4, 2, 2])).toBeCloseTo(5 / 3, 14);
		expect(averageMovingRange([1])).toBeNull();
	});
});

group('EWMA (NIST/SEMATECH e-Handbook §6.3.2.4, its worked example)', () => {
	// The e-Handbook's example [M: data, EWMA values and limits as remembered from the page]:
	// EWMA0 = 50, s = 2.0539, λ = 0.3, k = 3; UCL = 52.5884, LCL = 47.4115 (steady-state limits).
	const data = [52.0, 47.0, 53.0, 49.3, 50.1, 47.0, 51.0, 50.1, 51.2, 50.5, 49.6, 47.6, 49.9, 51.3, 47.8, 51.2, 52.6, 52.4, 53.6, 52.1];
	const published = [50.6, 49.52, 50.56, 50.18, 50.16, 49.21, 49.75, 49.85, 50.26, 50.33, 50.11, 49.36, 49.52, 50.05, 49.38, 49.92, 50.73, 51.23, 51.94, 51.99];
	const c = ewmaChart(data, 50, 2.0539, 0.3, 3);

	it('the EWMA values to the two decimals printed', () => {
		c.points.forEach((p, i) => expect(Math.abs(p.z - published[i])).toBeLessThanOrEqual(0.005 + 1e-9));
	});
	it('the steady-state limits 52.5884 and 47.4115', () => {
		expect(c.steadyUcl).toBeCloseTo(52.5884, 3);
		expect(c.steadyLcl).toBeCloseTo(47.4115, 3);
	});
	it('the exact limits start narrow and approach the steady ones; no point beyond', () => {
		// t = 1: 3·2.0539·√(0.3/1.7·(1 − 0.7²)) = 3·2.0539·√0.09 = 1.84851 [C].
		expect(c.points[0].ucl - 50).toBeCloseTo(1.84851, 5);
		expect(c.points[19].ucl).toBeCloseTo(c.steadyUcl, 5);
		expect(c.points.some((p) => p.beyond)).toBe(false);
	});
	it('the defaults are λ = 0.2, L = 3', () => {
		const d = ewmaChart([1], 0, 1);
		expect([d.lambda, d.L]).toEqual([0.2, 3]);
		expect(d.steadyUcl).toBeCloseTo(3 * Math.sqrt(0.2 / 1.8), 12);
	});
});

group('p-chart with varying n (NIST/SEMATECH e-Handbook §6.3.3.2)', () => {
	it('the e-Handbook’s wafer example: p̄ = 0.2313, n = 50 gives UCL 0.4102, LCL 0.0524', () => {
		// p̄ [S] (the e-Handbook's page, as quoted by textbook exercises); the limits [M] and [C]:
		// 0.2313 ± 3·√(0.2313·0.7687/50) = 0.2313 ± 0.17890.
		const l = pChartLimits(0.2313, 50);
		expect(l.ucl).toBeCloseTo(0.4102, 4);
		expect(l.lcl).toBeCloseTo(0.0524, 4);
	});
	it('limits vary with each month’s n; the lower one stops at 0', () => {
		// [C] p̄ = 12/300 = 0.04; n = 100: 0.04 ± 3·√(0.0384/100) = 0.04 ± 0.05879; n = 200: ± 0.04157.
		const c = pChart([
			{ n: 100, failures: 10 },
			{ n: 200, failures: 2 },
			{ n: 0, failures: 0 }
		]);
		expect(c.pBar).toBeCloseTo(0.04, 12);
		expect(c.points).toHaveLength(2);
		expect(c.points[0].ucl).toBeCloseTo(0.09879, 5);
		expect(c.points[0].lcl).toBe(0);
		expect(c.points[1].ucl).toBeCloseTo(0.08157, 5);
		expect(c.points[1].lcl).toBe(0);
		expect(c.points.map((p) => p.beyond)).toEqual([true, false]);
		expect(pChart([]).pBar).toBeNull();
	});
});

group('baseline limits, clipped at the physical bounds', () => {
	it('x̄ ± 2.66·MR̄ of the baseline; σ = MR̄/1.128', () => {
		const b = baselineFigures([10, 11, 10, 11, 10, 11, 10, 11, 10, 20])!;
		expect(b.n).toBe(10);
		expect(b.centre).toBeCloseTo(11.4, 12);
		expect(b.mrBar).toBeCloseTo(2, 12);
		expect(sigmaFromMrBar(2)).toBeCloseTo(1.773, 3);
		expect(baselineFigures([1])).toBeNull();
	});
	it('a hold % limit above 100 is drawn at 100, a negative lower limit at 0', () => {
		// The case: an upper limit of 103.93 % for a quantity that cannot exceed 100 %.
		const l = clippedLimits({ n: 50, centre: 97, mrBar: 2.605 }, { min: 0, max: 100 });
		expect(l.rawUcl).toBeCloseTo(103.9293, 4);
		expect([l.ucl, l.uclClipped, l.lclClipped]).toEqual([100, true, false]);
		expect(l.lcl).toBeCloseTo(90.0707, 4);
		const r = clippedLimits({ n: 50, centre: 0.01, mrBar: 0.01 }, { min: 0, max: null });
		expect([r.lcl, r.lclClipped, r.uclClipped]).toEqual([0, true, false]);
		expect(r.rawLcl).toBeCloseTo(-0.0166, 12);
	});
});
