import { describe, expect, it } from 'vitest';
import { usualRange } from './usual-range';

describe('usualRange', () => {
	it('sets a fence below the physical bound to the bound and says so (clearance cannot be negative)', () => {
		expect(usualRange({ low: -0.023, high: 0.121 }, { min: 0, max: null })).toEqual({ low: 0, high: 0.121, clippedLow: true, clippedHigh: false });
	});
	it('clips a share at 100 %', () => {
		expect(usualRange({ low: 91.5, high: 104.2 }, { min: 0, max: 100 })).toEqual({ low: 91.5, high: 100, clippedLow: false, clippedHigh: true });
	});
	it('leaves fences inside the bounds alone', () => {
		expect(usualRange({ low: 0.012, high: 0.061 }, { min: 0, max: null })).toEqual({ low: 0.012, high: 0.061, clippedLow: false, clippedHigh: false });
	});
});
