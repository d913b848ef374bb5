// The number formats the analysis pages share.
import { describe, expect, it } from 'vitest';
import { fmtLimits, fmtValue } from './charts';

describe('fmtLimits', () => {
	it('writes both limits, one of them, or none, with the measurement\'s decimals', () => {
		expect(fmtLimits('clearance', { min: 0.02, max: 0.08 })).toBe(`${fmtValue('clearance', 0.02)} – ${fmtValue('clearance', 0.08)}`);
		expect(fmtLimits('clearance', { min: null, max: 0.08 })).toBe(`at most ${fmtValue('clearance', 0.08)}`);
		expect(fmtLimits('seat_width', { min: 1, max: null })).toBe(`at least ${fmtValue('seat_width', 1)}`);
		expect(fmtLimits('clearance', { min: null, max: null })).toBe('none set');
		expect(fmtLimits('clearance', null)).toBe('none set');
	});
});
