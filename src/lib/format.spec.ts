// The number formats every page, chart and table shares.
import { describe, expect, it } from 'vitest';
import { axisLabel, count, fmtLimits, fmtPct, fmtValue, fmtWithUnit, MISSING, pValue, stamp } from './format';

describe('fmtLimits', () => {
	it("writes both limits, one of them, or none, with the measurement's decimals", () => {
		expect(fmtLimits('clearance', { min: 0.02, max: 0.08 })).toBe('0.020 – 0.080');
		expect(fmtLimits('clearance', { min: null, max: 0.08 })).toBe('at most 0.080');
		expect(fmtLimits('seat_width', { min: 1, max: null })).toBe('at least 1.00');
		expect(fmtLimits('clearance', { min: null, max: null })).toBe('none set');
		expect(fmtLimits('clearance', null)).toBe('none set');
	});
	it('adds the unit when asked', () => {
		expect(fmtLimits('clearance', { min: 0.02, max: 0.08 }, true)).toBe('0.020 – 0.080 mm');
		expect(fmtLimits('clearance', { min: null, max: 0.08 }, true)).toBe('at most 0.080 mm');
		expect(fmtLimits('clearance', null, true)).toBe('none set');
	});
});

describe('values, shares and counts', () => {
	it('writes a missing value as an em dash everywhere', () => {
		expect(MISSING).toBe('—');
		expect(fmtValue('clearance', null)).toBe('—');
		expect(fmtValue('clearance', Number.NaN)).toBe('—');
		expect(fmtWithUnit('clearance', undefined)).toBe('—');
		expect(fmtPct(null)).toBe('—');
	});
	it('uses the measurement decimals, one more for summaries', () => {
		expect(fmtValue('clearance', 0.0523)).toBe('0.052');
		expect(fmtValue('clearance', 0.0523, 1)).toBe('0.0523');
		expect(fmtWithUnit('clearance', 0.0523)).toBe('0.052 mm');
		expect(axisLabel('clearance')).toBe('Stem-to-guide clearance (mm)');
	});
	it('writes shares, counts, p-values and time stamps', () => {
		expect(fmtPct(0.1234)).toBe('12.3 %');
		expect(fmtPct(0.5, 0)).toBe('50 %');
		expect(count(12345)).toBe('12,345');
		expect(pValue(0.0312)).toBe('p = 0.031');
		expect(pValue(0.0004)).toBe('p < 0.001');
		expect(pValue(null)).toBe('p not defined');
		expect(stamp('2026-01-31T14:05:09.000Z')).toBe('2026-01-31 14:05');
	});
});
