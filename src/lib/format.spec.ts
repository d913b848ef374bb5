// The number formats every page, chart and table shares.
import { describe, expect, it } from 'vitest';
import { axisLabel, count, fmtLimits, fmtPct, fmtPoints, fmtPointsRange, fmtValue, fmtWithUnit, MISSING, pValue, sideDifferenceWords, stamp } from './format';

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
		expect(pValue(0.0004)).toBe('p = 4.0e-4');
		expect(pValue(1e-15, true)).toBe('p < 1e-15');
		expect(pValue(null)).toBe('p not defined');
		expect(stamp('2026-01-31T14:05:09.000Z')).toBe('2026-01-31 14:05');
	});
});

describe('percentage points and differences', () => {
	it('writes a difference of shares in signed percentage points, with a minus sign', () => {
		expect(fmtPoints(0.068)).toBe('+6.8 points');
		expect(fmtPoints(-0.0991)).toBe('−9.9 points');
		expect(fmtPoints(0.00001)).toBe('0.0 points');
		expect(fmtPoints(null)).toBe(MISSING);
		expect(fmtPointsRange(-0.099, -0.003)).toBe('−9.9 to −0.3 points');
		expect(fmtPointsRange(null, 0.1)).toBe(MISSING);
	});
	it('words the verdict from the interval and the check', () => {
		const d = { difference: -0.05, ci95: { low: -0.099, high: -0.003 }, verdict: 'exhaust_higher' as const };
		expect(sideDifferenceWords(d, 'reused as is')).toBe(
			'Intake minus exhaust: −5.0 points (95 % interval −9.9 to −0.3 points): exhaust positions are reused as is more often than intake positions.'
		);
		expect(sideDifferenceWords({ ...d, ci95: { low: -0.099, high: 0.01 }, verdict: 'not_clearly_different' }, 'outside the limits')).toBe(
			'Intake minus exhaust: −5.0 points (95 % interval −9.9 to +1.0 points): not clearly different (the interval includes no difference).'
		);
	});
});
