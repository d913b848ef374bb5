import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fixedApart, fromCanonical, parseSide, parseStage, toCanonical } from './measurements';

describe('unit conversion', () => {
	// NIST SP 811 (2008), Appendix B: 1 in = 25.4 mm exactly (international agreement of 1959).
	it.each([
		[0.001, 'in', 0.0254],
		[0.0025, 'in', 0.0635],
		[0.2165, 'in', 5.4991],
		[1, 'in', 25.4]
	] as const)('%s %s is %s mm', (value, unit, mm) => {
		expect(toCanonical(value, unit)).toBe(mm);
	});

	// 1 µin = 0.0254 µm exactly; table of common finishes (worked by hand: 16 × 0.0254 = 0.4064).
	it.each([
		[16, 0.4064],
		[32, 0.8128],
		[63, 1.6002],
		[125, 3.175]
	])('%s µin is %s µm', (uin, um) => {
		expect(toCanonical(uin, 'uin')).toBe(um);
	});

	it('leaves canonical units alone', () => {
		expect(toCanonical(0.065, 'mm')).toBe(0.065);
		expect(toCanonical(98.5, 'pct')).toBe(98.5);
	});

	it('round-trips inches and micro-inches at instrument resolution (property)', () => {
		// Gauges read inches to 0.0001 in and finishes to 0.1 µin: integers of those steps.
		fc.assert(
			fc.property(fc.integer({ min: 0, max: 20_000 }), (steps) => {
				const inches = steps / 10_000;
				expect(fromCanonical(toCanonical(inches, 'in'), 'in')).toBe(inches);
				const uin = steps / 10;
				expect(fromCanonical(toCanonical(uin, 'uin'), 'uin')).toBe(uin);
			})
		);
	});

	it('converts any double within 1e-12 relative and back (property)', () => {
		fc.assert(
			fc.property(fc.double({ min: 1e-6, max: 1e3, noNaN: true }), (x) => {
				const mm = toCanonical(x, 'in');
				expect(Math.abs(mm - x * 25.4) / (x * 25.4)).toBeLessThan(1e-11);
				expect(Math.abs(fromCanonical(mm, 'in') - x) / x).toBeLessThan(1e-11);
			})
		);
	});
});

describe('sides and stages as shops write them', () => {
	it.each(['intake', 'IN', 'i', ' Intake '])('%s is intake', (s) => expect(parseSide(s)).toBe('intake'));
	it.each(['exhaust', 'EX', 'e', 'Exhaust'])('%s is exhaust', (s) => expect(parseSide(s)).toBe('exhaust'));
	it.each(['out', '', 'x'])('%s is not a side', (s) => expect(parseSide(s)).toBeNull());
	it('reads stages', () => {
		expect(parseStage('as_received')).toBe('as_received');
		expect(parseStage('As Received')).toBe('as_received');
		expect(parseStage('final')).toBe('final');
		expect(parseStage('after')).toBeNull();
	});
});

describe('fixedApart', () => {
	it('keeps the usual decimals unless the value would print equal to what it is compared with', () => {
		expect(fixedApart(0.201, 0.12, 3)).toBe('0.201');
		expect(fixedApart(0.1004, 0.1, 3)).toBe('0.1004');
		expect(fixedApart(0.10000004, 0.1, 3)).toBe('0.1000000'); // at most 4 more decimals
		expect(fixedApart(0.1, 0.1, 3)).toBe('0.100');
		expect(fixedApart(0.05, null, 3)).toBe('0.050');
	});
});
