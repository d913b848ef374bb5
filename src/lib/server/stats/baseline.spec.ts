// The fleet baseline from value counts. Reference: median and raw MAD as in Iglewicz & Hoaglin
// (1993), docs/REFERENCES.md B7 (R mad(x, constant = 1)); the literals were computed with
// Python's statistics.median over the expanded values and over their natural logs.
import { describe, expect, it } from 'vitest';
import { baselineOfCounts } from './baseline';

describe('baselineOfCounts', () => {
	it('gives median, MAD, min, max and their log-scale twins', () => {
		const values = [
			0.04, 0.045, 0.05, 0.052, 0.055, 0.058, 0.06, 0.062, 0.065, 0.068, 0.07, 0.075, 0.08, 0.09,
			0.1, 0.12, 0.15, 0.18, 0.25
		];
		// Out of order and with one value counted twice (0.065 ×2 → 20 readings).
		const counts = values.map((v) => [v, v === 0.065 ? 2 : 1] as const).reverse();
		const b = baselineOfCounts(counts);
		expect(b.n).toBe(20);
		expect(b.min).toBe(0.04);
		expect(b.max).toBe(0.25);
		expect(b.median).toBeCloseTo(0.0665, 12);
		expect(b.mad).toBeCloseTo(0.014, 12);
		expect(b.logMedian).toBeCloseTo(-2.71080779, 7);
		expect(b.logMad).toBeCloseTo(0.21765904, 7);
	});

	it('leaves the log scale empty when no reading is positive, and all empty with no readings', () => {
		expect(baselineOfCounts([[0, 3]])).toMatchObject({ n: 3, median: 0, mad: 0, logMedian: null, logMad: null });
		expect(baselineOfCounts([])).toEqual({ n: 0, median: null, mad: null, min: null, max: null, logMedian: null, logMad: null });
	});
});
