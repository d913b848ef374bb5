// The index re-exports the statistics layer: each public function, called through it, gives a
// value worked out by hand (or a textbook value, named beside it).
import { describe as group, expect, it } from 'vitest';
import * as stats from './index';

group('stats index', () => {
	it('summaries: describe, quantileType7 and the moments', () => {
		const d = stats.describe([1, 2, 3, 4, 5]);
		expect(d).toMatchObject({ n: 5, mean: 3, min: 1, max: 5, iqr: 2, mad: 1, fences: { low: -1, high: 7 } });
		expect(d.sd).toBeCloseTo(1.5811388300841898, 15); // √2.5
		expect(d.quantiles).toEqual({ p05: 1.2, p25: 2, p50: 3, p75: 4, p95: 4.8 });
		expect(stats.quantileType7([1, 2, 3, 4], 0.25)).toBe(1.75); // 1 + 0.75·(2 − 1)
		expect(stats.emptyMoments()).toEqual({ n: 0, mean: 0, m2: 0, min: null, max: null });
		const m = [2, 4, 6].reduce((a, x) => stats.addValue(a, x), stats.emptyMoments());
		expect(m).toEqual({ n: 3, mean: 4, m2: 8, min: 2, max: 6 });
		const two = stats.addValue(stats.addValue(stats.emptyMoments(), 2), 4);
		expect(stats.mergeMoments(two, stats.addValue(stats.emptyMoments(), 6))).toEqual({ n: 3, mean: 4, m2: 8, min: 2, max: 6 });
		expect(stats.momentsToSummary(m)).toEqual({ n: 3, mean: 4, variance: 4, sd: 2, min: 2, max: 6 });
	});

	it('where a reading sits: modifiedZ, tukeyFlag, percentileRank, outlierReasons', () => {
		expect(stats.modifiedZ(9, 5, 2)).toBeCloseTo(1.349, 12); // 0.6745 · 4 / 2
		expect(stats.tukeyFlag(8, { low: -1, high: 7 })).toBe('high');
		expect(stats.tukeyFlag(-2, { low: -1, high: 7 })).toBe('low');
		expect(stats.tukeyFlag(3, { low: -1, high: 7 })).toBeNull();
		expect(stats.percentileRank([1, 2, 3, 4], 3)).toBe(0.75);
		expect(stats.outlierReasons({ value: 0.12, limits: { max: 0.1 }, fences: { low: null, high: null }, median: null, mad: null, decimals: 3 })).toEqual([
			{ code: 'above_limit', text: '0.120 is above the upper limit 0.100.' }
		]);
	});

	it('rates: wilson, fisherExact2x2, chiSquare2x2, compareProportions', () => {
		const w = stats.wilson(0, 10);
		expect(w.rate).toBe(0);
		expect(w.low).toBe(0);
		expect(w.high).toBeCloseTo(0.2775328, 6); // z²/(n + z²), z = 1.959964
		const f = stats.fisherExact2x2([
			[3, 1],
			[1, 3]
		]);
		expect(f.p).toBeCloseTo(17 / 35, 12); // Fisher's tea-tasting table: p = 0.4857
		expect(f.oddsRatio).toBe(9);
		expect(
			stats.chiSquare2x2([
				[10, 10],
				[10, 10]
			])
		).toEqual({ statistic: 0, df: 1, p: 1, expected: [[10, 10], [10, 10]] });
		const c = stats.compareProportions(5, 10, 5, 10);
		expect(c.rate1.rate).toBe(0.5);
		expect(c.difference).toBe(0);
		expect(c.p).toBe(1); // equal shares: score statistic 0
	});

	it('capability, controlChart and linearFit', () => {
		const cap = stats.capability([1, 3, 2], { lsl: 0, usl: 6 });
		expect(cap.mean).toBe(2);
		expect(cap.sdOverall).toBe(1);
		expect(cap.pp).toBeCloseTo(1, 12); // 6 / (6 · 1)
		expect(cap.ppk).toBeCloseTo(2 / 3, 12); // (2 − 0) / (3 · 1)
		expect(cap.sdWithin).toBeCloseTo(1.5 / 1.128, 12); // MR̄ / d2
		const cc = stats.controlChart([
			{ t: 1, value: 1 },
			{ t: 2, value: 3 },
			{ t: 3, value: 2 }
		]);
		expect(cc.centre).toBe(2);
		expect(cc.mrBar).toBe(1.5);
		expect(cc.ucl).toBeCloseTo(2 + 2.66 * 1.5, 12);
		expect(cc.mrUcl).toBeCloseTo(3.267 * 1.5, 12);
		expect(stats.linearFit([1, 2, 3], [2, 4, 6])).toMatchObject({ n: 3, slope: 2, intercept: 0, r2: 1, df: 1 });
		expect(stats.CONTROL_CHART_CONSTANTS[2].d2).toBe(1.128); // docs/REFERENCES.md B5
	});
});
