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
