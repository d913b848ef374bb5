import { describe, expect, it } from 'vitest';
import { addDays, dayNumber, dayOfNumber, daysBetween, isoDay } from './days';

describe('calendar days (UTC)', () => {
	it('adds days across month, year and leap-day boundaries', () => {
		expect(addDays('2026-01-31', 1)).toBe('2026-02-01');
		expect(addDays('2025-12-31', 1)).toBe('2026-01-01');
		expect(addDays('2024-02-28', 1)).toBe('2024-02-29');
		expect(addDays('2026-03-01', -1)).toBe('2026-02-28');
		expect(addDays('2026-03-29', 0)).toBe('2026-03-29');
	});
	it('counts whole days between two days', () => {
		expect(daysBetween('2026-01-01', '2026-12-31')).toBe(364);
		expect(daysBetween('2024-03-01', '2024-02-28')).toBe(-2);
	});
	it('numbers days from 1970-01-01', () => {
		expect(dayNumber('1970-01-02')).toBe(1);
		expect(dayNumber('2026-12-01')).toBe(20788);
		expect(dayOfNumber(20788)).toBe('2026-12-01');
		expect(isoDay(new Date('2026-05-04T23:59:59.999Z'))).toBe('2026-05-04');
	});
});
