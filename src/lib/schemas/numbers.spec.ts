// Form fields read through the one typed-number reader (domain/numbers.ts): what a person types
// at intake, for a comeback, a leak row and a limit, and what is stored or refused.
import { describe, expect, it } from 'vitest';
import { limitSchema } from './families';
import { comebackSchema, leakRowSchema } from './heads';

const comeback = (usage: string, usageUnit = 'mi') => comebackSchema.safeParse({ returnedOn: '2026-11-02', usageUnit, usage, whatFailed: 'Burnt exhaust valve', positions: [] });
const limit = (min: string, max: string, unit = 'mm') =>
	limitSchema.safeParse({ stage: 'final', measurement: 'clearance', side: 'both', unit, min, max, effectiveFrom: '2026-01-01', note: '' });
const messages = (r: { success: boolean; error?: { issues: { message: string }[] } }) => r.error?.issues.map((i) => i.message);

describe('mileage as typed', () => {
	it('reads thousands separators as thousands', () => {
		expect(comeback('142,350').data?.usage).toBe(142350);
		expect(comeback('142 350').data?.usage).toBe(142350);
		expect(comeback('142.350', 'km').data?.usage).toBe(142350);
		expect(comeback('1,042,350', 'km').data?.usage).toBe(1042350);
	});

	it('refuses a negative, a fraction and a slip beyond any odometer, saying which', () => {
		expect(messages(comeback('−100'))).toEqual(['Mileage cannot be negative.']);
		expect(messages(comeback('-100'))).toEqual(['Mileage cannot be negative.']);
		expect(messages(comeback('1423.5', 'h'))).toEqual(['Engine hours takes whole numbers: “1423.5” is not one.']);
		expect(messages(comeback('4,000,000'))).toEqual(['Mileage is at most 3\u2009100\u2009000: “4,000,000” is more.']);
		expect(comeback('').data?.usage).toBe(null);
	});
});

describe('leak rows and limits as typed', () => {
	it('takes either decimal mark where only one reading fits', () => {
		expect(leakRowSchema.safeParse({ pct: '12,5', pin: '', held: '', path: 'none' }).data).toEqual({ pct: 12.5, pin: null, held: null, path: 'none' });
		expect(limit('', '0,070').data).toMatchObject({ min: null, max: 0.07 });
		expect(limit('1,250', '1,750').data).toMatchObject({ min: 1.25, max: 1.75 });
	});

	it('refuses a limit that reads two ways, and one beyond its unit', () => {
		expect(messages(limit('', '1,200', 's'))).toEqual([
			'“1,200” — did you mean 1\u2009200 or 1.2? Type it without the separator, or with a space between thousands.'
		]);
		expect(messages(limit('', '250', 'mm'))).toEqual(['The maximum is at most 100: “250” is more.']);
		expect(messages(limit('0.09', '0.07'))).toEqual(['The maximum must not be below the minimum.']);
		expect(messages(limit('x', '0.07'))).toEqual(['“x” is not a number: type digits with a point or a comma for decimals.']);
	});
});
