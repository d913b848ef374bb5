import fc from 'fast-check';
import { describe as group, expect, it } from 'vitest';
import { countBeyond, expandCounts, robustOfSorted, summarizeCounts, summarizeSorted, type ValueCount } from './frequency';
import { describe, momentsOf } from './summary';

/** A frequency table of an array (sorted, distinct values). */
function table(values: readonly number[]): ValueCount[] {
	const m = new Map<number, number>();
	for (const v of values) m.set(v, (m.get(v) ?? 0) + 1);
	return [...m].sort((a, b) => a[0] - b[0]);
}

group('expandCounts', () => {
	it('expands a table to its sorted series, skipping zero counts', () => {
		expect(expandCounts([[0.05, 2], [0.06, 0], [0.07, 1]])).toEqual([0.05, 0.05, 0.07]);
		expect(expandCounts([])).toEqual([]);
	});

	it('refuses unsorted or repeated values, fractional counts and non-finite values', () => {
		expect(() => expandCounts([[2, 1], [1, 1]])).toThrow(RangeError);
		expect(() => expandCounts([[1, 1], [1, 1]])).toThrow(RangeError);
		expect(() => expandCounts([[1, 1.5]])).toThrow(RangeError);
		expect(() => expandCounts([[Number.NaN, 1]])).toThrow(RangeError);
	});
});

group('summarizeCounts equals describe() on the raw readings', () => {
	// The type-7 quartiles of 1…10 (Hyndman & Fan 1996; R quantile(type = 7)): docs/REFERENCES.md B8,
	// values [C] 1.9 / 3.25 / 5.5 / 7.75 / 9.1 for p = 0.10 / 0.25 / 0.50 / 0.75 / 0.90.
	it('1…10: quartiles 3.25 / 5.5 / 7.75 (docs/REFERENCES.md B8), MAD 2.5 by hand', () => {
		const s = summarizeCounts(table([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]));
		expect(s.quantiles.p25).toBe(3.25);
		expect(s.quantiles.p50).toBe(5.5);
		expect(s.quantiles.p75).toBe(7.75);
		// |x − 5.5| = 4.5, 3.5, 2.5, 1.5, 0.5, 0.5, 1.5, 2.5, 3.5, 4.5 → median 2.5 (by hand).
		expect(s.mad).toBe(2.5);
		expect(s.fences).toEqual({ low: 3.25 - 1.5 * 4.5, high: 7.75 + 1.5 * 4.5 });
	});

	it('matches describe() field by field on quantised data (property)', () => {
		fc.assert(
			fc.property(fc.array(fc.integer({ min: 0, max: 300 }), { minLength: 0, maxLength: 400 }), (ints) => {
				// Values at 0.001 mm, as a clearance gauge reads them.
				const values = ints.map((i) => i / 1000);
				const { lag1Autocorrelation: _r1, ...expected } = describe(values);
				const actual = summarizeCounts(table(values));
				expect(actual.n).toBe(expected.n);
				expect(actual.quantiles).toEqual(expected.quantiles);
				expect(actual.mad).toBe(expected.mad);
				expect(actual.fences).toEqual(expected.fences);
				expect(actual.histogram).toEqual(expected.histogram);
				expect(actual.min).toBe(expected.min);
				expect(actual.max).toBe(expected.max);
				if (expected.mean === null) expect(actual.mean).toBeNull();
				else expect(actual.mean).toBeCloseTo(expected.mean, 12);
				if (expected.sd === null) expect(actual.sd).toBeNull();
				else expect(Math.abs((actual.sd as number) - expected.sd)).toBeLessThanOrEqual(1e-12 * Math.max(1, expected.sd));
			})
		);
	});

	it('takes count, mean and SD from given moments', () => {
		const sorted = [1, 2, 3];
		const s = summarizeSorted(sorted, { ...momentsOf(sorted), mean: 2.5 });
		expect(s.mean).toBe(2.5);
		expect(() => summarizeSorted(sorted, momentsOf([1, 2]))).toThrow(RangeError);
	});

	it('n = 1: no SD; all values equal: zero spread, one histogram bin', () => {
		expect(summarizeCounts([[0.05, 1]]).sd).toBeNull();
		const same = summarizeCounts([[0.05, 4]]);
		expect(same.sd).toBe(0);
		expect(same.mad).toBe(0);
		expect(same.iqr).toBe(0);
		expect(same.histogram).toEqual([{ x0: 0.05, x1: 0.05, count: 4 }]);
	});

	it('an empty table gives nulls, never NaN', () => {
		const s = summarizeCounts([]);
		expect(s.n).toBe(0);
		expect(JSON.stringify(s)).not.toMatch(/NaN/);
		expect(s.mean).toBeNull();
		expect(s.quantiles.p50).toBeNull();
	});
});

group('robustOfSorted', () => {
	it('median, MAD and fences agree with summarizeSorted (Grubbs data, docs/REFERENCES.md B7: median 201.37, MAD 0.995)', () => {
		// NIST e-Handbook §1.3.5.17 Grubbs example data as listed in docs/REFERENCES.md B6; median, MAD
		// and type-7 fences 197.051 / 204.981 there are [C] (recomputed).
		const x = [199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57];
		const r = robustOfSorted(x);
		const s = summarizeSorted(x);
		expect(r).toEqual({ n: 8, median: s.quantiles.p50, mad: s.mad, fences: s.fences });
		expect(r.median).toBeCloseTo(201.37, 10);
		expect(r.mad).toBeCloseTo(0.995, 10);
		expect(r.fences.low).toBeCloseTo(197.05125, 10);
		expect(r.fences.high).toBeCloseTo(204.98125, 10);
		expect(robustOfSorted([])).toEqual({ n: 0, median: null, mad: null, fences: { low: null, high: null } });
	});
});

group('countBeyond', () => {
	it('counts strictly below and strictly above, ignoring a missing bound', () => {
		const t: ValueCount[] = [[1, 2], [2, 3], [3, 4]];
		expect(countBeyond(t, 2, 2)).toEqual({ below: 2, above: 4 });
		expect(countBeyond(t, null, 2.5)).toEqual({ below: 0, above: 4 });
		expect(countBeyond(t, null, null)).toEqual({ below: 0, above: 0 });
	});
});
