import { describe, expect, it } from 'vitest';
import { assertCount, finiteArray, sortedCopy } from './input';

describe('input checks', () => {
	it('copies arrays and Float64Arrays', () => {
		// Definition of the helper (no external reference needed)
		expect(finiteArray([1, 2])).toEqual([1, 2]);
		expect(finiteArray(new Float64Array([3, 4]))).toEqual([3, 4]);
	});
	it('rejects NaN and infinities', () => {
		// Definition: null means undefined, so NaN must never enter a calculation
		expect(() => finiteArray([1, Number.NaN])).toThrow(RangeError);
		expect(() => finiteArray([Number.POSITIVE_INFINITY])).toThrow(RangeError);
	});
	it('rejects finite values whose sums overflow', () => {
		// IEEE 754 doubles: 1e308 − (−1e308) is Infinity, so the range and the variance would be too
		expect(() => finiteArray([1e308, -1e308, 1e308])).toThrow(/too large to sum/);
		expect(() => finiteArray([1e200, 1e200])).not.toThrow();
		expect(() => finiteArray([1e200, -1e200])).toThrow(RangeError);
		expect(finiteArray([1e-300, -1e-300])).toEqual([1e-300, -1e-300]);
	});
	it('sorts numerically, not as strings', () => {
		// Definition: JavaScript's default sort would put 10 before 9
		expect(sortedCopy([10, 9, -1, 2])).toEqual([-1, 2, 9, 10]);
	});
	it('accepts only non-negative integer counts', () => {
		// Definition of a count
		expect(() => assertCount(3, 'x')).not.toThrow();
		expect(() => assertCount(-1, 'x')).toThrow(RangeError);
		expect(() => assertCount(1.5, 'x')).toThrow(RangeError);
	});
});
